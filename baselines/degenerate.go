package baselines

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Decider is a model with real-valued outputs per test row beside its
// predictions. Decisions uses it for models outside this package.
type Decider interface {
	DecisionValues(X *mat.Dense) (*mat.Dense, error)
}

// Decisions returns the real-valued outputs of a fitted model on X, one
// row per row of X: SVM.DecisionFunction, LogReg.Decision, KNN.PredictProba
// (vote fractions), or DecisionValues for a Decider. It returns nil and no
// error for a model without such outputs (Centroid, for example), and the
// model's error otherwise.
func Decisions(m Model, X *mat.Dense) (*mat.Dense, error) {
	switch v := m.(type) {
	case *SVM:
		return v.DecisionFunction(X)
	case *LogReg:
		return v.Decision(X)
	case *KNN:
		return v.PredictProba(X)
	case Decider:
		return v.DecisionValues(X)
	}
	return nil, nil
}

// Degeneracy says whether the outputs of one model over the folds of a run
// carry no information about the test rows.
type Degeneracy struct {
	// SingleClass: every prediction on every fold is Class (and there was
	// at least one prediction).
	SingleClass bool
	Class       int
	// ConstantDecision: decision values were given for every fold and, on
	// every fold with at least two test rows, all rows of them are equal
	// (to twelve significant digits per column, relative to the column's
	// largest magnitude; equal infinities, and NaN with NaN, count as
	// equal). When no fold has two rows (leave-one-out), the rows of all
	// folds together are compared instead.
	ConstantDecision bool
}

// Any reports whether a degeneracy was found.
func (g Degeneracy) Any() bool { return g.SingleClass || g.ConstantDecision }

// constantTol is the relative spread below which decision values count as
// equal: twelve significant digits, far above the rounding of a sum of
// kernel terms (a few ulps) and far below any real difference between rows.
const constantTol = 1e-12

// CheckDegenerate examines the predictions of one model on the folds of a
// run (preds[f] for fold f) and, when decisions is not nil, its decision
// values (decisions[f], one row per prediction of fold f; a nil entry
// means the model gave none and ConstantDecision is not reported). A
// constant decision within a fold is what a model that learned nothing
// gives (an SVM whose kernel matrix is the identity decides every test row
// by its bias alone); the value itself may differ between folds.
func CheckDegenerate(preds [][]int, decisions []*mat.Dense) Degeneracy {
	var g Degeneracy
	seen, single := false, true
	for _, p := range preds {
		for _, c := range p {
			if !seen {
				g.Class, seen = c, true
			} else if c != g.Class {
				single = false
			}
		}
	}
	g.SingleClass = seen && single
	if !g.SingleClass {
		g.Class = 0
	}
	if len(decisions) == 0 {
		return g
	}
	var pooled flatness
	folds, flat := 0, true
	for _, z := range decisions {
		if z == nil {
			return g
		}
		r, _ := z.Dims()
		if r == 0 {
			continue
		}
		if !pooled.add(z) {
			return g // column counts differ
		}
		if r >= 2 {
			var f flatness
			f.add(z)
			folds++
			flat = flat && f.flat()
		}
	}
	switch {
	case folds > 0:
		g.ConstantDecision = flat
	case pooled.rows > 0:
		g.ConstantDecision = pooled.flat()
	}
	return g
}

// flatness accumulates, per column, the range of the values and whether NaN
// occurred.
type flatness struct {
	rows             int
	lo, hi, scale    []float64
	nanSome, numSome []bool
}

// add takes the rows of z; it reports false when z's column count differs
// from earlier rows'.
func (f *flatness) add(z *mat.Dense) bool {
	r, c := z.Dims()
	if f.lo == nil {
		f.lo, f.hi, f.scale = make([]float64, c), make([]float64, c), make([]float64, c)
		f.nanSome, f.numSome = make([]bool, c), make([]bool, c)
		for j := range c {
			f.lo[j], f.hi[j] = math.Inf(1), math.Inf(-1)
		}
	} else if c != len(f.lo) {
		return false
	}
	for i := range r {
		for j, v := range z.RawRowView(i) {
			if math.IsNaN(v) {
				f.nanSome[j] = true
				continue
			}
			f.numSome[j] = true
			f.lo[j], f.hi[j] = min(f.lo[j], v), max(f.hi[j], v)
			f.scale[j] = max(f.scale[j], math.Abs(v))
		}
		f.rows++
	}
	return true
}

func (f *flatness) flat() bool {
	for j := range f.lo {
		switch {
		case f.nanSome[j] && f.numSome[j]:
			return false // NaN in some rows only
		case !f.numSome[j]: // all NaN
		case f.lo[j] == f.hi[j]: // equal, infinities included
		case math.IsInf(f.scale[j], 1):
			return false
		case f.hi[j]-f.lo[j] > constantTol*f.scale[j]:
			return false
		}
	}
	return true
}
