package uncertainty

import (
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/samplemv"
)

// marginals is the joint distribution of independent uncertain parameters,
// as the multivariate quantile function gonum's Latin hypercube sampler maps
// its stratified uniforms through (distmv.Quantiler).
type marginals []Distribution

// Quantile maps p (one probability per parameter) to x, parameter by parameter.
func (m marginals) Quantile(x, p []float64) []float64 {
	if x == nil {
		x = make([]float64, len(p))
	}
	for i, d := range m {
		x[i] = d.Quantile(p[i])
	}
	return x
}

// samplingStream is the second word of the PCG state; with the request's
// seed it fixes the random stream (any constant would do; this one is ours).
const samplingStream = 0x646f776e67726164 // "downgrad"

// SampleLatinHypercube draws n realizations of the parameters by Latin
// hypercube sampling (gonum stat/samplemv.LatinHypercube): each parameter's
// probability range is cut into n equal strata, one uniform draw falls in
// each, the strata are paired at random across parameters, and each draw is
// mapped through the parameter's quantile function. Parameters are
// independent. The random stream is PCG (math/rand/v2) seeded with seed, so
// one seed reproduces the sample bit for bit. The result has n rows of
// len(params) values.
func SampleLatinHypercube(params []UncertainParameter, n int, seed uint64) [][]float64 {
	out := make([][]float64, n)
	d := len(params)
	if n <= 0 {
		return out
	}
	if d == 0 {
		for i := range out {
			out[i] = []float64{}
		}
		return out
	}
	q := make(marginals, d)
	for i, p := range params {
		q[i] = p.Dist
	}
	batch := mat.NewDense(n, d, nil)
	samplemv.LatinHypercube{Q: q, Src: rand.NewPCG(seed, samplingStream)}.Sample(batch)
	for i := range out {
		out[i] = append([]float64(nil), batch.RawRowView(i)...)
	}
	return out
}
