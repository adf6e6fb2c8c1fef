package datasets

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// Dimension reduction and feature choice: the steps "pca" and "select".

var (
	// ErrNeedsLabels marks a step whose fit needs the class of every
	// training row ("select"), fitted without them: use
	// Pipeline.FitLabeled or Pipeline.FitTransformLabeled.
	ErrNeedsLabels = errors.New("step needs the class labels of the training rows")
	// ErrStepData marks a training part on which a step cannot be fitted:
	// pca with fewer than two rows, select with fewer than two classes or
	// without a class holding two rows.
	ErrStepData = errors.New("training part unsuitable for the step")
)

// LabeledStep is a Step whose fit uses the class of every training row. Its
// plain Fit returns an error wrapping ErrNeedsLabels; Pipeline.FitLabeled
// calls FitLabeled instead.
type LabeledStep interface {
	Step
	// FitLabeled learns the step's state from the rows of X and their
	// class indices y (one per row, >= 0; any set of values).
	FitLabeled(X *mat.Dense, y []int) error
}

var (
	_ Step        = (*PCA)(nil)
	_ LabeledStep = (*SelectK)(nil)
)

// largeUnit and smallUnit bound the magnitudes PCA and SelectK work on
// directly; beyond them the values are first scaled by a power of two (an
// exact operation), so that sums of squares neither overflow nor
// underflow. Inside the bounds nothing is rescaled and results are the
// plain formulas' bit for bit.
const (
	largeUnit = 0x1p500
	smallUnit = 0x1p-500
)

// powerOfTwoScale returns a power of two that brings the largest
// magnitude top into [1, 2), or 1 when top is 0 or within
// [smallUnit, largeUnit].
func powerOfTwoScale(top float64) float64 {
	if top == 0 || top >= smallUnit && top <= largeUnit {
		return 1
	}
	return math.Ldexp(1, -math.Ilogb(top))
}

// PCA is the step "pca", "pca(k)" or "pca(f)": principal component
// analysis fitted on the training rows. The rows are centred on the
// training mean (features are not scaled; write "std+pca(k)" for PCA on
// standardised features) and projected on the principal axes, the right
// singular vectors of the centred training matrix (gonum mat.SVD), in
// order of decreasing singular value s_i. The output features are named
// pc1, pc2, ...
//
// The number of components is
//
//   - pca(k), k >= 1 a whole number: k. It must not exceed the number of
//     features nor of training rows (min(n, d), as scikit-learn's
//     svd_solver="full" requires); a larger k fails at Fit with an error
//     wrapping ErrStepParam.
//   - pca(f), 0 < f < 1: the fewest components whose cumulative explained
//     variance ratio exceeds f strictly: 1 + the number of i with
//     r_1 + ... + r_i <= f, at most min(n, d). This is scikit-learn 1.2.1's
//     rule for a float n_components with svd_solver="full"
//     (np.searchsorted(cumsum, f, side="right") + 1).
//   - pca: all min(n, d) components (scikit-learn's n_components=None): a
//     rotation onto the principal axes.
//
// pca(1) is one component; a share is written with a fraction point or an
// exponent and must be below 1, so pca(1.0) and pca(1e0) are refused (as
// scikit-learn 1.2.1 refuses n_components=1.0), with a hint to write
// pca(1).
//
// Sign convention: an axis is only defined up to its sign; each one is
// oriented so that its loading of largest magnitude is positive (ties, in
// exact equality, to the lowest feature index). This depends on the axis
// alone, not on the training rows (scikit-learn's svd_flip orients by the
// largest entry of U, i.e. by one training row).
//
// ExplainedVariance holds s_i^2/(n-1) and ExplainedVarianceRatio
// s_i^2 / sum of all s_j^2 (the same ratios as scikit-learn's, which
// divides both by n-1). PCA needs at least two training rows (ErrStepData).
// When every training row is the same, all ratios are 0 and pca(f) keeps
// all components, whose output is 0. Values near the float64 limits are
// rescaled by a power of two first, so the components and ratios stay
// finite; an explained variance that exceeds the float64 range is +Inf.
type PCA struct {
	K    int     // components asked for (pca(k)); 0 with Frac or for all
	Frac float64 // share of variance to exceed (pca(f)), in (0, 1); 0 otherwise

	Mean                   []float64  // training mean per input feature (set by Fit)
	Components             *mat.Dense // k x d: the principal axes as unit rows (set by Fit)
	ExplainedVariance      []float64  // per component: s_i^2 / (n - 1)
	ExplainedVarianceRatio []float64  // per component: s_i^2 / sum_j s_j^2

	unit       float64   // power-of-two factor applied before centring (1: none)
	scaledMean []float64 // Mean * unit
}

// Name returns "pca", "pca(k)" or "pca(f)" with f in the shortest decimal
// form that parses back to the same float64 (f < 1, so no '+' appears).
func (s *PCA) Name() string {
	switch {
	case s.K > 0:
		return "pca(" + strconv.Itoa(s.K) + ")"
	case s.Frac != 0:
		return "pca(" + strconv.FormatFloat(s.Frac, 'g', -1, 64) + ")"
	}
	return "pca"
}

// NComponents returns the number of components kept by the last Fit (0
// before).
func (s *PCA) NComponents() int {
	if s.Components == nil {
		return 0
	}
	r, _ := s.Components.Dims()
	return r
}

func (s *PCA) check() error {
	if s.K < 0 || s.K > 0 && s.Frac != 0 || s.Frac != 0 && !(s.Frac > 0 && s.Frac < 1) {
		return fmt.Errorf("%s: need a whole number of components >= 1 or a share in (0, 1): %w", s.Name(), ErrStepParam)
	}
	return nil
}

// Fit centres the training rows, factorises them and keeps the components.
func (s *PCA) Fit(X *mat.Dense) error {
	if err := s.check(); err != nil {
		return err
	}
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("%s: %w", s.Name(), err)
	}
	n, d := X.Dims()
	if err := s.checkDims(n, d); err != nil {
		return err
	}
	maxK := min(n, d)
	var top float64
	for i := range n {
		top = max(top, floats.Norm(X.RawRowView(i), math.Inf(1)))
	}
	unit := powerOfTwoScale(top)
	C := mat.NewDense(n, d, nil)
	C.Scale(unit, X)
	mean := make([]float64, d)
	col := make([]float64, n)
	for j := range d {
		mat.Col(col, j, C)
		mean[j] = floats.Sum(col) / float64(n)
	}
	for i := range n {
		floats.Sub(C.RawRowView(i), mean)
	}
	var svd mat.SVD
	if !svd.Factorize(C, mat.SVDThinV) {
		return fmt.Errorf("%s: the singular value decomposition did not converge", s.Name())
	}
	sv := svd.Values(nil)
	var V mat.Dense
	svd.VTo(&V) // d x min(n, d), column i the axis of sv[i]

	var total float64
	for _, v := range sv {
		total += v * v
	}
	ratio := make([]float64, len(sv))
	if total > 0 {
		for i, v := range sv {
			ratio[i] = v * v / total
		}
	}
	k := s.K
	switch {
	case s.Frac != 0:
		k = pcaCount(ratio, s.Frac)
	case k == 0:
		k = maxK
	}

	comps := mat.NewDense(k, d, nil)
	ev := make([]float64, k)
	for i := range k {
		row := comps.RawRowView(i)
		mat.Col(row, i, &V)
		orientAxis(row)
		sd := sv[i] / unit
		ev[i] = sd * sd / float64(n-1)
	}
	s.unit, s.scaledMean = unit, mean
	s.Mean = make([]float64, d)
	for j := range mean {
		s.Mean[j] = mean[j] / unit
	}
	s.Components = comps
	s.ExplainedVariance = ev
	s.ExplainedVarianceRatio = ratio[:k:k]
	return nil
}

// pcaCount returns the number of components pca(f) keeps given the
// explained variance ratios in decreasing order: 1 + the number of
// cumulative sums (added in order) that are <= f, at most len(ratio).
func pcaCount(ratio []float64, f float64) int {
	var cum float64
	k := 1
	for _, r := range ratio {
		cum += r
		if cum <= f {
			k++
		}
	}
	return min(k, len(ratio))
}

// orientAxis negates v if its entry of largest magnitude (the first of
// equal ones) is negative.
func orientAxis(v []float64) {
	big := 0
	for j := range v {
		if math.Abs(v[j]) > math.Abs(v[big]) {
			big = j
		}
	}
	if v[big] < 0 {
		floats.Scale(-1, v)
	}
}

// checkDims refuses a fit on n rows of d features.
func (s *PCA) checkDims(n, d int) error {
	if n < 2 {
		return fmt.Errorf("%s: needs at least 2 training rows, got %d: %w", s.Name(), n, ErrStepData)
	}
	if maxK := min(n, d); s.K > maxK {
		return fmt.Errorf("%s: %d components asked for, but the training part has %d features and %d rows (at most %d components): %w",
			s.Name(), s.K, d, n, maxK, ErrStepParam)
	}
	return nil
}

// Transform returns (x - mean) projected on the components, one column per
// component.
func (s *PCA) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if s.Components == nil {
		return nil, fmt.Errorf("%s: %w", s.Name(), ErrNotFitted)
	}
	if err := stepCheckTransform(s.Name(), len(s.Mean), X, rows); err != nil {
		return nil, err
	}
	n, d := X.Dims()
	C := mat.NewDense(n, d, nil)
	C.Scale(s.unit, X)
	for i := range n {
		floats.Sub(C.RawRowView(i), s.scaledMean)
	}
	var out mat.Dense
	out.Mul(C, s.Components.T())
	if s.unit != 1 {
		out.Scale(1/s.unit, &out) // a power of two: exact
	}
	return &out, nil
}

// FeatureNames returns pc1 .. pck: k is the number of components kept by
// Fit, or before Fit the number asked for (pca(k)) or an upper bound, the
// input width (pca(f) and pca).
func (s *PCA) FeatureNames(in []string) []string {
	k := s.NComponents()
	if k == 0 {
		k = s.K
		if k == 0 {
			k = len(in)
		}
	}
	out := make([]string, k)
	for i := range out {
		out[i] = "pc" + strconv.Itoa(i+1)
	}
	return out
}

// SelectK is the step "select(k)" (and "select", which is select(10), the
// default k of scikit-learn's SelectKBest): it keeps the k input features
// with the largest one-way ANOVA F statistic between the classes of the
// training rows, in their original order, under their original names.
//
// For a feature with values x over n training rows in C classes (class c
// with n_c rows and mean m_c, overall mean m),
//
//	F = [sum_c n_c (m_c - m)^2 / (C - 1)] / [sum_c sum_{i in c} (x_i - m_c)^2 / (n - C)],
//
// the statistic of scikit-learn's f_classif (there computed from raw sums
// of squares; here from centred sums, the same value with less rounding).
// A feature that is constant on the training rows has an undefined F (0/0;
// NaN in scikit-learn) and ranks below every other; a feature whose
// within-class spread is zero but which differs between classes has F =
// +Inf and ranks first. Ties (equal F, also several undefined) go to the
// lower feature index; note that scikit-learn's SelectKBest breaks exact
// ties the other way (a stable argsort, the last k taken).
//
// Fit without labels fails (ErrNeedsLabels); FitLabeled needs k <= the
// number of features (else ErrStepParam), at least two classes among the
// training rows and more rows than classes (else ErrStepData). Scores
// holds the F of every input feature (NaN where undefined) and Keep the
// chosen input indices, ascending.
type SelectK struct {
	K int // features to keep, >= 1

	Scores []float64 // ANOVA F per input feature (set by FitLabeled)
	Keep   []int     // kept input feature indices, ascending (set by FitLabeled)
	in     int       // input width seen at fit
}

// defaultSelectK is scikit-learn's SelectKBest default k (recalled from
// memory; SelectKBest(score_func=f_classif, *, k=10) in the 1.2 API
// reference).
const defaultSelectK = 10

// Name returns "select(k)", or "select" for k = 10.
func (s *SelectK) Name() string {
	if s.K == defaultSelectK {
		return "select"
	}
	return "select(" + strconv.Itoa(s.K) + ")"
}

// Fit fails: the step needs the class labels (see FitLabeled).
func (s *SelectK) Fit(*mat.Dense) error {
	return fmt.Errorf("%s: %w (fit the pipeline with FitLabeled or FitTransformLabeled)", s.Name(), ErrNeedsLabels)
}

// FitLabeled scores every feature on the training rows X with classes y
// and keeps the k best.
func (s *SelectK) FitLabeled(X *mat.Dense, y []int) error {
	if s.K < 1 {
		return fmt.Errorf("%s: need k >= 1: %w", s.Name(), ErrStepParam)
	}
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("%s: %w", s.Name(), err)
	}
	n, d := X.Dims()
	if len(y) != n {
		return fmt.Errorf("%s: %d labels for %d rows", s.Name(), len(y), n)
	}
	if err := s.checkDims(d); err != nil {
		return err
	}
	class := map[int]int{} // label -> group, in first-seen order
	group := make([]int, n)
	for i, c := range y {
		if c < 0 {
			return fmt.Errorf("%s: row %d has class index %d", s.Name(), i, c)
		}
		g, ok := class[c]
		if !ok {
			g = len(class)
			class[c] = g
		}
		group[i] = g
	}
	nc := len(class)
	if nc < 2 || n <= nc {
		return fmt.Errorf("%s: ANOVA F needs at least two classes and more training rows than classes, got %d rows of %d classes: %w",
			s.Name(), n, nc, ErrStepData)
	}
	scores := make([]float64, d)
	col := make([]float64, n)
	for j := range d {
		mat.Col(col, j, X)
		scores[j] = anovaF(col, group, nc)
	}
	order := make([]int, d)
	for j := range order {
		order[j] = j
	}
	// Decreasing F, NaN last, then increasing index.
	slices.SortStableFunc(order, func(a, b int) int {
		fa, fb := scores[a], scores[b]
		switch {
		case math.IsNaN(fa) && math.IsNaN(fb):
			return 0
		case math.IsNaN(fa):
			return 1
		case math.IsNaN(fb):
			return -1
		case fa > fb:
			return -1
		case fa < fb:
			return 1
		}
		return 0
	})
	keep := slices.Clone(order[:s.K])
	slices.Sort(keep)
	s.Scores, s.Keep, s.in = scores, keep, d
	return nil
}

// checkDims refuses a fit on d features.
func (s *SelectK) checkDims(d int) error {
	if s.K > d {
		return fmt.Errorf("%s: %d features asked for, but the training part has %d: %w", s.Name(), s.K, d, ErrStepParam)
	}
	return nil
}

// CheckDims checks, before any fit, that the pipeline can be fitted on a
// training part of rows x features: every pca(k) must see at least 2 rows
// and k <= min(rows, width), every select(k) k <= width, where width is
// the number of features reaching the step. It returns the width of the
// output, an upper bound after pca(f) or pca (which keep at most
// min(rows, width) components), and the first violation, with the
// message Fit would give, wrapping ErrStepParam or ErrStepData. A
// pipeline that passes can still fail at Fit only through its data (a
// zero row, an overflow, a select(k) after pca(f) keeping fewer than k
// components).
func (p *Pipeline) CheckDims(rows, features int) (int, error) {
	w := features
	for _, st := range p.Steps {
		switch s := st.(type) {
		case *PCA:
			if err := s.checkDims(rows, w); err != nil {
				return 0, fmt.Errorf("datasets: pipeline %s: %w", p, err)
			}
			if s.K > 0 {
				w = s.K
			} else {
				w = min(rows, w)
			}
		case *SelectK:
			if err := s.checkDims(w); err != nil {
				return 0, fmt.Errorf("datasets: pipeline %s: %w", p, err)
			}
			w = s.K
		default:
			w = len(st.FeatureNames(make([]string, w)))
		}
	}
	return w, nil
}

// anovaF returns the one-way ANOVA F of the values x in the groups
// 0..nc-1 (every group non-empty, len(x) > nc), NaN for a constant x.
func anovaF(x []float64, group []int, nc int) float64 {
	lo, hi := floats.Min(x), floats.Max(x)
	if lo == hi {
		return math.NaN()
	}
	unit := powerOfTwoScale(max(math.Abs(lo), math.Abs(hi)))
	count := make([]float64, nc)
	sum := make([]float64, nc)
	var total float64
	for i, v := range x {
		v *= unit
		count[group[i]]++
		sum[group[i]] += v
		total += v
	}
	n := float64(len(x))
	mean := total / n
	var ssb float64
	for g := range nc {
		sum[g] /= count[g] // the class mean
		dm := sum[g] - mean
		ssb += count[g] * dm * dm
	}
	var ssw float64
	for i, v := range x {
		dv := v*unit - sum[group[i]]
		ssw += dv * dv
	}
	msb := ssb / float64(nc-1)
	msw := ssw / (n - float64(nc))
	if msw == 0 {
		if msb == 0 {
			return math.NaN()
		}
		return math.Inf(1)
	}
	return msb / msw
}

// Transform keeps the chosen columns.
func (s *SelectK) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if s.Keep == nil {
		return nil, fmt.Errorf("%s: %w", s.Name(), ErrNotFitted)
	}
	if err := stepCheckTransform(s.Name(), s.in, X, rows); err != nil {
		return nil, err
	}
	n, _ := X.Dims()
	out := mat.NewDense(n, len(s.Keep), nil)
	for i := range n {
		src, dst := X.RawRowView(i), out.RawRowView(i)
		for q, j := range s.Keep {
			dst[q] = src[j]
		}
	}
	return out, nil
}

// FeatureNames returns the names of the kept features. Before FitLabeled
// (or for names of another width than fitted) it returns the first k
// names, so that the width is right but the names are placeholders.
func (s *SelectK) FeatureNames(in []string) []string {
	if s.Keep != nil && len(in) == s.in {
		out := make([]string, len(s.Keep))
		for q, j := range s.Keep {
			out[q] = in[j]
		}
		return out
	}
	return append([]string(nil), in[:min(s.K, len(in))]...)
}
