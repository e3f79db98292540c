// Package runner turns a fitseal project file into results: it loads and
// checks the project (TOML), reads the datasets (CSV), plans every
// analysis × candidate family, runs the fits on a pool of workers and
// assembles the result tables in plan order, so that the bytes do not depend
// on the number of workers.
//
// # Project file
//
// [Load] reads a project file, applies the defaults of the specification and
// checks every value. Each problem is a [*ProjectError] naming the file, the
// line (where one can be found) and the key path, e.g.
// "fitseal.toml:14: dataset[1].colum: unknown key", with a hint such as
// `did you mean "column"?`.
//
// # Data
//
// Group order is the order of first appearance among the rows that `where`
// keeps. In interval data an empty cell is an open bound; a row with both
// bounds open, or with another missing token, counts as missing; a row with
// lower ≥ upper is an error (every interval row counts as censored). A trials column cannot be combined with
// censoring, and a count above its trials is an error.
//
// [ReadDataset] streams one CSV file and returns one group per value of the
// dataset's split_by column (or a single group), with censoring taken from a
// status column or from lower/upper columns. Every problem is a
// [*DataError] naming the file and line, and the cells at fault by their
// columns' header names: `life.csv line 7, column "hours": …`.
//
// # Inference
//
// Every converged fit gets, from package fitters/infer: standard errors from
// the observed information and intervals by the project's method (wald,
// profile or bootstrap); the derived quantities asked for (quantiles, return
// levels, exceedance probabilities) with intervals, and their
// Akaike-weighted model averages; goodness-of-fit statistics with
// parametric-bootstrap p-values. One bootstrap of settings.bootstrap
// replicates per fit serves both the bootstrap intervals and the p-values;
// data censored in one direction are simulated as they were censored (the
// conditional bootstrap) and binned data in their bins, while overlapping
// intervals and data censored both ways are not simulated, and results.json
// says so.
//
// # Seeds
//
// Every random stream of a run belongs to one fit: replicate r of the
// bootstrap of family F in analysis A draws from a PCG generator seeded with
// the first 16 bytes of SHA-256("MASTER|A|F|bootstrap|r") (see
// [SeedDerivation] and infer.Stream), so no seed depends on the order in which
// tasks run or on the number of workers, and one fit's streams do not change
// when other analyses are added or removed. [Results.Record] lists every
// stream with its replicate count and replicate 0's seed.
//
// # Results
//
// [Run] returns [*Results]; [Results.Files] gives the result tables
// (fits.csv, parameters.csv, derived.csv, gof.csv, results.json) as bytes,
// and [Results.Record] the effective settings and every derived seed for the
// bundle's run.json.
package runner
