// Package infer turns a maximum-likelihood fit into the numbers a decision
// needs: standard errors from the observed information, confidence intervals
// for the parameters (Wald, profile likelihood, parametric bootstrap), derived
// quantities (quantiles, return levels, exceedance probabilities) with
// intervals, Akaike-weighted model averages, and goodness-of-fit statistics
// with parametric-bootstrap p-values.
//
// It works through the [fitters.Family] and [fitters.Dist] interfaces only,
// so every family of package fitters is handled the same way.
//
// # Scales
//
// Each parameter is handled on the scale where its likelihood behaves best
// (Meeker & Escobar, 1998, §8.3): log for positive parameters, logit for
// probabilities, the natural scale otherwise; see [ScaleOf].
//
// # Random streams
//
// Every bootstrap replicate draws from its own stream, seeded by
// SHA-256("seed|analysis|family|purpose|replicate") (see [Stream.StreamSeed]), so a
// replicate's numbers do not depend on which worker ran it, and results are
// identical for any number of workers.
package infer
