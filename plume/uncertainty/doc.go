// Package uncertainty propagates uncertain inputs through a screening: the
// distributions (lognormal, uniform, loguniform, triangular, empirical) of
// scenario numbers named by plume.Param are sampled by Latin hypercube
// (gonum stat/samplemv), every realization is evaluated through plume.Model
// (or plume.Screen when the numeric method is asked for), and the results
// are summarised per receptor, time and method: mean, percentiles,
// probability of exceeding the screening level with its Clopper-Pearson
// interval, and the parameters ranked by Spearman rank correlation with
// the peak. The workload limits of a run live here (CheckWorkload).
package uncertainty
