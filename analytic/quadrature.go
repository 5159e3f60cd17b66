package analytic

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// glOrder is the number of Gauss-Legendre nodes per panel of the adaptive
// rule. With the substitutions used in this package the integrands are
// smooth on the scale of the panels, so a low order with bisection is cheaper
// than a high order.
const glOrder = 8

// glNodes and glWeights are the Gauss-Legendre nodes and weights on [-1, 1],
// computed once by gonum's quad.Legendre.
var glNodes, glWeights = func() ([]float64, []float64) {
	x := make([]float64, glOrder)
	w := make([]float64, glOrder)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

// gaussLegendre applies the fixed glOrder-point rule to f on [a, b].
func gaussLegendre(f func(float64) float64, a, b float64) float64 {
	c, h := (a+b)/2, (b-a)/2
	var s float64
	for i, xi := range glNodes {
		s += glWeights[i] * f(c+h*xi)
	}
	return s * h
}

// maxPanelsPerIntegral bounds the work of one adaptive integration (each
// panel costs 2*glOrder evaluations), so that a tolerance made unreachable by
// round-off in the integrand cannot make the bisection run away.
const maxPanelsPerIntegral = 400

// adaptive integrates f over [a, b], whose fixed-rule value whole is already
// known, by comparing it with the sum over the two halves and bisecting where
// they disagree by more than tol (absolute). depth bounds the recursion and
// *budget the number of bisections left; at either limit the better estimate
// is returned.
func adaptive(f func(float64) float64, a, b, whole, tol float64, depth int, budget *int) float64 {
	m := (a + b) / 2
	left := gaussLegendre(f, a, m)
	right := gaussLegendre(f, m, b)
	*budget--
	sum := left + right
	if depth <= 0 || *budget <= 0 || math.Abs(sum-whole) <= tol {
		return sum
	}
	return adaptive(f, a, m, left, tol/2, depth-1, budget) + adaptive(f, m, b, right, tol/2, depth-1, budget)
}

// panel is one subinterval of an integration with a rigorous upper bound of
// the integral over it.
type panel struct {
	a, b  float64
	bound float64
}

// integratePanels integrates f over the union of the panels to relative
// accuracy rel. Panels are visited from the largest bound down; once the
// bounds left add up to less than a hundredth of the error allowed, they are
// not evaluated at all. The panels slice is reordered.
func integratePanels(f func(float64) float64, panels []panel, rel float64) float64 {
	return integratePanelsBudget(f, panels, rel, maxPanelsPerIntegral)
}

// integratePanelsBudget is integratePanels with the number of bisections
// allowed over all panels given.
func integratePanelsBudget(f func(float64) float64, panels []panel, rel float64, budget int) float64 {
	// Insertion sort by bound, descending: the lists are short.
	for i := 1; i < len(panels); i++ {
		for j := i; j > 0 && panels[j].bound > panels[j-1].bound; j-- {
			panels[j], panels[j-1] = panels[j-1], panels[j]
		}
	}
	var rest float64
	for _, p := range panels {
		rest += p.bound
	}
	var total float64
	for _, p := range panels {
		if p.bound == 0 {
			break
		}
		if total > 0 && rest < 0.01*rel*total {
			break
		}
		rest -= p.bound
		whole := gaussLegendre(f, p.a, p.b)
		scale := math.Abs(total + whole)
		if scale == 0 {
			scale = 1e-12 * p.bound
		}
		total += adaptive(f, p.a, p.b, whole, 0.1*rel*scale, 20, &budget)
	}
	return total
}
