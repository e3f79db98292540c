package report

import (
	"math"
	"time"
)

// sealAnalysis is a hand-made analysis for the rendering tests. Its numbers
// are placeholders chosen to exercise formatting (negative ln L, NaN
// p-values, an inapplicable family, a model-averaged row); they are not
// results of any fit.
func sealAnalysis() Analysis {
	nan := math.NaN()
	return Analysis{
		Name: "seal-life", Dataset: "seal-life", Units: "h",
		Criterion: "aicc", Confidence: 0.95,
		Summary: DataSummary{N: 36, Exact: 19, RightCensored: 17, Min: 2620, Median: 5563, Max: 10576},
		Ranking: []Candidate{
			{Family: "weibull", Rank: 1, K: 2, LogLik: -181.234567, Criterion: 366.83, Delta: 0, Weight: 0.61234, Support: "substantial", Statistic: "ad", AdequacyP: 0.415, Converged: true},
			{Family: "gamma", Rank: 2, K: 2, LogLik: -181.9, Criterion: 368.16, Delta: 1.333, Weight: 0.31456, Support: "substantial", Statistic: "ad", AdequacyP: nan, Converged: true},
			{Family: "exponential", Rank: 3, K: 1, LogLik: -186.2, Criterion: 374.52, Delta: 7.69, Weight: 0.0131, Support: "little", Converged: true, AdequacyP: 0.004},
			{Family: "lognormal", Rank: 0, K: 2, LogLik: nan, Criterion: nan, Delta: nan, Weight: nan, AdequacyP: nan, Note: "did not converge: iteration cap reached"},
		},
		Parameters: []Parameter{
			{Family: "weibull", Name: "shape", Estimate: 1.8123, StdError: 0.31, Lower: 1.25, Upper: 2.49, Method: "profile", BestFamily: true},
			{Family: "weibull", Name: "scale", Estimate: 9012.7, StdError: 850, Lower: 7600, Upper: 11200, Method: "profile", BestFamily: true},
			{Family: "exponential", Name: "rate", Estimate: 1.234e-4, StdError: 2.8e-5, Lower: 7.9e-5, Upper: 1.9e-4, Method: "profile"},
		},
		Derived: []Derived{
			{Family: "weibull", Quantity: Quantile, Argument: 0.1, Estimate: 2612.3, Lower: 1700, Upper: 3400, Method: "profile"},
			{Family: "weibull", Quantity: Exceedance, Argument: 4000, Estimate: 0.8123, Lower: 0.7, Upper: 0.9, Method: "profile"},
			{Family: ModelAverage, Quantity: Quantile, Argument: 0.1, Estimate: 2580, Lower: 1650, Upper: 3420, Method: "model-averaged (Burnham & Anderson 2002)"},
		},
		Notes: []string{"lognormal is shown unranked: its fit did not converge"},
	}
}

func rainAnalysis() Analysis {
	return Analysis{
		Name: "storm_rainfall", Dataset: "storm-rainfall", Units: "mm",
		Criterion: "aic", CriterionNote: "ranked by AIC: AICc is undefined for one family (n ≤ k + 1)", Confidence: 0.9,
		Summary: DataSummary{N: 38, Exact: 38, Missing: 2, Min: 15.5, Median: 26.55, Max: 50.2},
		Ranking: []Candidate{
			{Family: "gumbel", Rank: 1, K: 2, LogLik: -130.1, Criterion: 264.2, Delta: 0, Weight: 0.7, Support: "substantial", Statistic: "ad", AdequacyP: 0.6, Converged: true},
			{Family: "gev", Rank: 2, K: 3, LogLik: -129.9, Criterion: 265.8, Delta: 1.6, Weight: 0.3, Support: "substantial", Statistic: "ad", AdequacyP: 0.55, Converged: true},
		},
		Derived: []Derived{
			{Family: "gumbel", Quantity: ReturnLevel, Argument: 100, Estimate: 52.4, Lower: 45.1, Upper: 61.9, Method: "profile"},
		},
	}
}

var testCreated = time.Date(2026, 12, 2, 3, 4, 5, 0, time.UTC)
