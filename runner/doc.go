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
// [ReadDataset] streams one CSV file and returns one group per value of the
// dataset's split_by column (or a single group), with censoring taken from a
// status column or from lower/upper columns. Every problem is a
// [*DataError] naming file:line:column.
//
// # Seeds
//
// Every random stream of a run has its own seed, derived from the master
// seed and the task's identity by [DeriveSeed]: the first eight bytes
// (big-endian) of the SHA-256 digest of
//
//	"fitseal seed v1\x00" + decimal(master) + "\x00" + analysis + "\x00" + family + "\x00" + purpose
//
// so a seed never depends on the order in which tasks run, and one task's
// seed does not change when other analyses are added or removed.
//
// # Results
//
// [Run] returns [*Results]; [Results.Files] gives the result tables
// (fits.csv, parameters.csv, derived.csv, gof.csv, results.json) as bytes,
// and [Results.Record] the effective settings and every derived seed for the
// bundle's run.json.
package runner
