package analytic

import (
	"math"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// Checks of the decay-chain evaluators against external high-precision
// references: testdata/reference/chain_reference.json, written by
// testdata/reference/gen_chain.py with mpmath (34-50 digits; see its doc
// string). The coupled 1D equations of shared/DESIGN.md section 3b are
// solved there in the Laplace domain with general matrix functions
// (mpmath.sqrtm, mpmath.expm) straight from the physical parameters and
// both decay conventions, and inverted by Talbot's method (checked against
// de Hoog's method, and for equal retardation against the Sun, Petersen &
// Clement (1999) sum of Ogata-Banks closed forms); the 3D values are the
// age integral of the exact finite-source kernel (Wexler 1992) against the
// Bateman weights expm(-K tau) c0 by tanh-sinh quadrature; the Domenico
// values are divided differences of the Domenico (1987) longitudinal factor
// at 50 digits. The chains are test data (see the generator).
//
// Tolerances per case class (relative, where the reference is above
// 1e-12 of the largest source strength; absolute 1e-12 of it below):
//
//	equal R, linked rates >= 10 % apart (decoupled closed forms)    1e-10 (issue 13)
//	equal R, repeated or nearly repeated rates (age integral)       1e-10
//	distinct R (Laplace inversion in float64)                       1e-10
//	equal R by the Laplace route                                    1e-10
//	source histories (Laplace, a difference for a finite duration)  1e-8
//	exact 3D (quadrature at 1e-7, age integral at 1e-10)             1e-6
//	Domenico (divided differences of a closed form)                 1e-10
//
// The tests log the worst error of each class (measured when the
// reference was generated: 2.5e-12, 4.2e-12, 1.4e-12, 9.4e-14, 5.5e-10,
// 4.6e-15 and 7.0e-16).

type chainRefCompound struct {
	HalfLife   *float64 `json:"half_life"`
	R          float64  `json:"R"`
	Convention string   `json:"convention"`
	Daughter   int      `json:"daughter"`
	Yield      float64  `json:"yield"`
}

type chainRefRow struct {
	Time   refNum   `json:"time"`
	Values []refNum `json:"values"`
}

type chainRefCase struct {
	Name      string             `json:"name"`
	V         float64            `json:"v"`
	D         float64            `json:"D"`
	Dy        float64            `json:"Dy"`
	Dz        float64            `json:"Dz"`
	X         float64            `json:"x"`
	Y         float64            `json:"y"`
	Top       float64            `json:"top"`
	Width     float64            `json:"width"`
	Depth     float64            `json:"depth"`
	Inlet     string             `json:"inlet"`
	Depletion float64            `json:"depletion"`
	Duration  float64            `json:"duration"`
	C0        []float64          `json:"c0"`
	Chain     []chainRefCompound `json:"chain"`
	Rows      []chainRefRow      `json:"rows"`
}

type chainRefFile struct {
	Column   []chainRefCase `json:"column"`
	Exact3D  []chainRefCase `json:"exact3d"`
	Domenico []chainRefCase `json:"domenico"`
}

// chain converts the case's physical parameters: Mu = mu (decay of the
// total mass) or mu/R (dissolved phase only), RetardedDecayRate.
func (rc *chainRefCase) chain() Chain {
	c := make(Chain, len(rc.Chain))
	for i, k := range rc.Chain {
		mu := 0.0
		if k.HalfLife != nil {
			mu = math.Ln2 / *k.HalfLife
		}
		d := k.Daughter
		if d < 0 {
			d = NoDaughter
		}
		c[i] = Compound{R: k.R, Mu: RetardedDecayRate(mu, k.R, k.Convention == "dissolved"), Daughter: d, Yield: k.Yield}
	}
	return c
}

func (rc *chainRefCase) history() History {
	return History{Duration: rc.Duration, Depletion: rc.Depletion}
}

// chainClass names the tolerance class of a column case.
func chainClass(rc *chainRefCase) (string, float64) {
	switch {
	case rc.Depletion > 0 || rc.Duration > 0:
		return "source histories", 1e-8
	case strings.HasPrefix(rc.Name, "distinctR") || strings.HasPrefix(rc.Name, "tree_distinct"):
		return "distinct R (Laplace)", 1e-10
	case strings.Contains(rc.Name, "repeated") || strings.Contains(rc.Name, "allequal") || strings.Contains(rc.Name, "near"):
		return "equal R, repeated rates", 1e-10
	}
	return "equal R, rates >= 10% apart", 1e-10
}

// chainWorst tracks the worst relative error per class.
type chainWorst map[string]*struct {
	worst float64
	where string
	n     int
}

func (w chainWorst) add(class string, rel float64, where string) {
	e, ok := w[class]
	if !ok {
		e = &struct {
			worst float64
			where string
			n     int
		}{}
		w[class] = e
	}
	e.n++
	if rel > e.worst {
		e.worst, e.where = rel, where
	}
}

func (w chainWorst) log(t *testing.T) {
	keys := make([]string, 0, len(w))
	for k := range w {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		t.Logf("%-32s %4d values, worst relative error %.2e (%s)", k, w[k].n, w[k].worst, w[k].where)
	}
}

// compare checks got against the reference row with tolerance tol.
func chainCompare(t *testing.T, w chainWorst, class string, tol float64, rc *chainRefCase, row chainRefRow, got []float64) {
	t.Helper()
	scale := 0.0
	for _, v := range rc.C0 {
		scale = math.Max(scale, v)
	}
	for i, ref := range row.Values {
		want := float64(ref)
		where := rc.Name + " " + rc.Inlet + " x=" + fmtG(rc.X) + " t=" + fmtG(float64(row.Time)) + " compound " + fmtG(float64(i))
		if math.IsNaN(got[i]) || math.IsInf(got[i], 0) || got[i] < 0 {
			t.Errorf("%s: %g", where, got[i])
			continue
		}
		if want < 1e-12*scale {
			if math.Abs(got[i]-want) > 1e-12*scale {
				t.Errorf("%s: %.6g, reference %.6g (absolute)", where, got[i], want)
			}
			continue
		}
		rel := refRel(got[i], want)
		w.add(class, rel, where)
		if rel > tol {
			t.Errorf("%s [%s]: %.15g, reference %.15g (rel %.2e > %.0e)", where, class, got[i], want, rel, tol)
		}
	}
}

func TestChainReferenceColumn(t *testing.T) {
	var f chainRefFile
	refLoad(t, "chain_reference.json", &f)
	w := chainWorst{}
	for k := range f.Column {
		rc := &f.Column[k]
		c := rc.chain()
		inlet := FirstType
		if rc.Inlet == "flux" {
			inlet = ThirdType
		}
		class, tol := chainClass(rc)
		for _, row := range rc.Rows {
			got := make([]float64, len(c))
			if err := ChainColumnAt(rc.X, float64(row.Time), Params{V: rc.V, Dx: rc.D}, inlet, rc.history(), c, rc.C0, got); err != nil {
				t.Fatalf("%s: %v", rc.Name, err)
			}
			chainCompare(t, w, class, tol, rc, row, got)
			if !c.EqualRetardation() {
				continue
			}
			// Equal R: the Laplace-domain route too (it is the one used for
			// distinct R; here it is checked where the decoupled closed
			// forms are the other route).
			lap := make([]float64, len(c))
			if err := ChainColumnLaplace(rc.X, float64(row.Time), Params{V: rc.V, Dx: rc.D}, inlet, rc.history(), c, rc.C0, lap, nil); err != nil {
				t.Fatalf("%s: %v", rc.Name, err)
			}
			chainCompare(t, w, "equal R by the Laplace route", 1e-10, rc, row, lap)
		}
	}
	w.log(t)
	if len(w) == 0 {
		t.Fatal("no reference values compared")
	}
}

func TestChainReferenceExact3D(t *testing.T) {
	var f chainRefFile
	refLoad(t, "chain_reference.json", &f)
	w := chainWorst{}
	for k := range f.Exact3D {
		rc := &f.Exact3D[k]
		c := rc.chain()
		p := Params{V: rc.V, Dx: rc.D, Dy: rc.Dy, Dz: rc.Dz}
		s := Source{Width: rc.Width, Depth: rc.Depth}
		pt := Point{X: rc.X, Y: rc.Y, Top: rc.Top, Bottom: rc.Top}
		for _, row := range rc.Rows {
			got := make([]float64, len(c))
			if err := ChainExact3DAt(pt, float64(row.Time), p, s, History{}, c, rc.C0, got); err != nil {
				t.Fatalf("%s: %v", rc.Name, err)
			}
			chainCompare(t, w, "exact 3D "+strings.TrimPrefix(rc.Name, "exact3d_"), 1e-6, rc, row, got)
		}
	}
	w.log(t)
	if len(w) == 0 {
		t.Fatal("no reference values compared")
	}
}

func TestChainReferenceDomenico(t *testing.T) {
	var f chainRefFile
	refLoad(t, "chain_reference.json", &f)
	w := chainWorst{}
	for k := range f.Domenico {
		rc := &f.Domenico[k]
		c := rc.chain()
		p := Params{V: rc.V, Dx: rc.D, Dy: rc.Dy, Dz: rc.Dz}
		s := Source{Width: rc.Width, Depth: rc.Depth}
		pt := Point{X: rc.X, Y: rc.Y, Top: rc.Top, Bottom: rc.Top}
		for _, row := range rc.Rows {
			got := make([]float64, len(c))
			if err := ChainDomenicoAt(pt, float64(row.Time), p, s, History{}, c, rc.C0, got); err != nil {
				t.Fatalf("%s: %v", rc.Name, err)
			}
			chainCompare(t, w, "Domenico "+strings.TrimPrefix(rc.Name, "domenico_"), 1e-10, rc, row, got)
		}
	}
	w.log(t)
	if len(w) == 0 {
		t.Fatal("no reference values compared")
	}
}

func fmtG(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }
