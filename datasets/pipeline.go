package datasets

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// Preprocessing pipelines.
//
// A Pipeline is a sequence of Steps written as their names joined by '+'
// ("std+l2", "minmax+lift(2)+pad"); "raw" is the pipeline with no steps.
// Every step is fitted on the training rows of a split only and then applied
// to training and test rows with the training statistics, so no test value
// ever influences what a model sees. Steps carry fitted state: build a fresh
// Pipeline (ParsePipeline is cheap) for every task. After Fit, Transform only
// reads the fitted state and may be called from several goroutines at once;
// Fit must not run concurrently with anything else on the same Pipeline.

var (
	// ErrUnknownStep marks a pipeline step name that is not known, or an
	// empty step in a pipeline string ("std++l2").
	ErrUnknownStep = errors.New("unknown preprocessing step")
	// ErrStepParam marks a step parameter that is malformed or out of range
	// ("lift(x)", "lift(-1)"), or a parameter given to a step that takes none.
	ErrStepParam = errors.New("invalid step parameter")
	// ErrZeroVector marks a row that cannot be scaled to unit length because
	// its Euclidean norm is zero (or not finite). It travels inside a
	// *RowError that names the dataset row.
	ErrZeroVector = errors.New("zero vector cannot be scaled to unit norm")
	// ErrNotFitted is returned by Transform before a successful Fit.
	ErrNotFitted = errors.New("preprocessing step not fitted")
	// ErrNotFiniteValue marks a NaN or infinite feature value given to a
	// step. It travels inside a *RowError that names the dataset row.
	ErrNotFiniteValue = errors.New("feature value is not finite")
)

// Step is one preprocessing stage. Fit learns statistics from training rows;
// Transform returns a new matrix (X is never modified) computed with those
// statistics. rows holds, for each row of X, the dataset row id used in
// error messages (Dataset.Rows); nil means the row positions 0, 1, ...
type Step interface {
	// Name returns the canonical spelling, e.g. "std" or "lift(0.5)";
	// ParsePipeline accepts it and yields an equivalent step.
	Name() string
	// Fit learns the step's statistics from the rows of X.
	Fit(X *mat.Dense) error
	// Transform applies the fitted step to the rows of X.
	Transform(X *mat.Dense, rows []int) (*mat.Dense, error)
	// FeatureNames returns the feature names after the step, given the
	// names before it.
	FeatureNames(in []string) []string
}

// Pipeline is a sequence of preprocessing steps applied in order.
type Pipeline struct {
	Steps []Step
}

// StepInfo describes one kind of step for listings.
type StepInfo struct {
	Name        string // step name as written in a pipeline
	Syntax      string // how to write it, with any parameter
	Description string // one line
}

// StepInfos returns the known steps in a fixed order.
func StepInfos() []StepInfo {
	return []StepInfo{
		{Name: "std", Syntax: "std", Description: "z-score each feature with the training mean and population standard deviation"},
		{Name: "minmax", Syntax: "minmax", Description: "scale each feature to [0,1] with the training minimum and maximum"},
		{Name: "l2", Syntax: "l2", Description: "scale each row to unit Euclidean norm (a zero row is an error)"},
		{Name: "pad", Syntax: "pad", Description: "append zero features up to the next power of two"},
		{Name: "lift", Syntax: "lift | lift(c)", Description: "append the constant c > 0 (default 1), then scale each row to unit norm; keeps the original norm as an angle"},
		{Name: "norm", Syntax: "norm", Description: "replace each row by its Euclidean norm (one feature): what unit-norm scaling throws away"},
		{Name: "pca", Syntax: "pca | pca(k) | pca(f)", Description: "principal components of the centred training rows (features pc1, pc2, ...): all, k >= 1 of them, or the fewest whose cumulative explained variance ratio exceeds f in (0,1); each axis signed so its largest loading is positive"},
		{Name: "select", Syntax: "select | select(k)", Description: "keep the k features (default 10) with the largest one-way ANOVA F between the classes of the training rows, in their original order; constant features rank last, ties to the lower index"},
	}
}

// ParsePipeline parses a pipeline string: "raw" for no steps, or step names
// joined by '+'. Spaces around step names are ignored. Errors name the
// offending step and wrap ErrUnknownStep or ErrStepParam.
func ParsePipeline(s string) (*Pipeline, error) {
	t := strings.TrimSpace(s)
	if t == "raw" {
		return &Pipeline{}, nil
	}
	if t == "" {
		return nil, fmt.Errorf("datasets: pipeline %q: empty (write \"raw\" for no preprocessing): %w", s, ErrUnknownStep)
	}
	parts := strings.Split(t, "+")
	p := &Pipeline{Steps: make([]Step, 0, len(parts))}
	for i, part := range parts {
		st, err := parseStep(strings.TrimSpace(part))
		if err != nil {
			return nil, fmt.Errorf("datasets: pipeline %q: step %d %q: %w", s, i+1, strings.TrimSpace(part), err)
		}
		p.Steps = append(p.Steps, st)
	}
	return p, nil
}

// parseStep builds one step from its text. Errors carry no package prefix;
// ParsePipeline adds the context.
func parseStep(text string) (Step, error) {
	if text == "" {
		return nil, fmt.Errorf("empty step: %w", ErrUnknownStep)
	}
	name, arg, hasArg := text, "", false
	if open := strings.IndexByte(text, '('); open >= 0 {
		if !strings.HasSuffix(text, ")") {
			return nil, fmt.Errorf("missing closing parenthesis: %w", ErrStepParam)
		}
		name, arg, hasArg = text[:open], text[open+1:len(text)-1], true
	} else if strings.IndexByte(text, ')') >= 0 {
		return nil, fmt.Errorf("unbalanced parenthesis: %w", ErrStepParam)
	}
	name = strings.TrimSpace(name)
	arg = strings.TrimSpace(arg)
	switch name {
	case "std", "minmax", "l2", "pad", "norm":
		if hasArg {
			return nil, fmt.Errorf("step %s takes no parameter: %w", name, ErrStepParam)
		}
		switch name {
		case "std":
			return &Standardize{}, nil
		case "minmax":
			return &MinMax{}, nil
		case "l2":
			return &UnitNorm{}, nil
		case "norm":
			return &RowNorm{}, nil
		default:
			return &Pad{}, nil
		}
	case "lift":
		if !hasArg {
			return &Lift{C: 1}, nil
		}
		if arg == "" {
			return nil, fmt.Errorf("empty parameter (write lift or lift(c)): %w", ErrStepParam)
		}
		c, err := strconv.ParseFloat(arg, 64)
		if err != nil {
			return nil, fmt.Errorf("parameter %q is not a finite number: %w", arg, ErrStepParam)
		}
		if !(c > 0) || math.IsInf(c, 0) {
			return nil, fmt.Errorf("parameter %s must be finite and > 0: %w", arg, ErrStepParam)
		}
		return &Lift{C: c}, nil
	case "pca":
		if !hasArg {
			return &PCA{}, nil
		}
		return parsePCA(arg)
	case "select":
		if !hasArg {
			return &SelectK{K: defaultSelectK}, nil
		}
		k, err := parseCount(arg)
		if err != nil {
			return nil, fmt.Errorf("select(%s): %v (write select(k) with k >= 1): %w", arg, err, ErrStepParam)
		}
		return &SelectK{K: k}, nil
	case "raw":
		return nil, fmt.Errorf("raw stands alone and cannot be combined with other steps: %w", ErrUnknownStep)
	}
	return nil, fmt.Errorf("%q (known: std, minmax, l2, pad, lift, norm, pca, select): %w", name, ErrUnknownStep)
}

// parseCount parses a whole number >= 1 written in decimal digits only.
func parseCount(arg string) (int, error) {
	if arg == "" {
		return 0, errors.New("empty parameter")
	}
	for i := 0; i < len(arg); i++ {
		if arg[i] < '0' || arg[i] > '9' {
			return 0, fmt.Errorf("%q is not a whole number", arg)
		}
	}
	k, err := strconv.Atoi(arg)
	if err != nil {
		return 0, fmt.Errorf("%s is too large", arg)
	}
	if k < 1 {
		return 0, fmt.Errorf("%d is below 1", k)
	}
	return k, nil
}

// parsePCA parses the parameter of pca(k) or pca(f): digits only mean a
// count of components; anything else must be a share of variance in (0, 1).
func parsePCA(arg string) (Step, error) {
	isDigits := arg != ""
	for i := 0; i < len(arg); i++ {
		if arg[i] < '0' || arg[i] > '9' {
			isDigits = false
		}
	}
	if isDigits {
		k, err := parseCount(arg)
		if err != nil {
			return nil, fmt.Errorf("pca(%s): %v (write pca(k) with k >= 1 components, or pca(f) with 0 < f < 1): %w", arg, err, ErrStepParam)
		}
		return &PCA{K: k}, nil
	}
	f, err := strconv.ParseFloat(arg, 64)
	switch {
	case arg == "":
		return nil, fmt.Errorf("empty parameter (write pca, pca(k) or pca(f)): %w", ErrStepParam)
	case err != nil || math.IsNaN(f) || math.IsInf(f, 0):
		return nil, fmt.Errorf("pca(%s): parameter is not a number (write pca(k) with k >= 1 components, or pca(f) with 0 < f < 1): %w", arg, ErrStepParam)
	case f >= 1 && f == math.Trunc(f) && f <= 1<<31:
		return nil, fmt.Errorf("pca(%s): a share of variance must be below 1; for %d component(s) write pca(%d): %w", arg, int(f), int(f), ErrStepParam)
	case !(f > 0 && f < 1):
		return nil, fmt.Errorf("pca(%s): write pca(k) with a whole number k >= 1 of components, or pca(f) with a share 0 < f < 1: %w", arg, ErrStepParam)
	}
	return &PCA{Frac: f}, nil
}

// String returns the canonical pipeline name ("raw" when there are no steps).
func (p *Pipeline) String() string {
	if len(p.Steps) == 0 {
		return "raw"
	}
	names := make([]string, len(p.Steps))
	for i, s := range p.Steps {
		names[i] = s.Name()
	}
	return strings.Join(names, "+")
}

// Fit fits the steps in order on the training rows X: step 1 on X, step 2 on
// the output of step 1, and so on. rows names the dataset rows of X for
// error messages (nil: positions).
func (p *Pipeline) Fit(X *mat.Dense, rows []int) error {
	_, err := p.fit(X, nil, rows, false)
	return err
}

// FitTransform fits the pipeline on X and returns X transformed.
func (p *Pipeline) FitTransform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	return p.fit(X, nil, rows, true)
}

// FitLabeled is Fit with the class index of every training row, which
// steps that use classes (LabeledStep: "select") need; the other steps
// ignore y. A pipeline without such steps gives the same result as Fit.
func (p *Pipeline) FitLabeled(X *mat.Dense, y, rows []int) error {
	if y == nil {
		y = []int{}
	}
	_, err := p.fit(X, y, rows, false)
	return err
}

// FitTransformLabeled is FitTransform with class labels (see FitLabeled).
func (p *Pipeline) FitTransformLabeled(X *mat.Dense, y, rows []int) (*mat.Dense, error) {
	if y == nil {
		y = []int{}
	}
	return p.fit(X, y, rows, true)
}

// NeedsLabels reports whether a step of the pipeline uses class labels,
// so that only FitLabeled and FitTransformLabeled can fit it.
func (p *Pipeline) NeedsLabels() bool {
	for _, s := range p.Steps {
		if _, ok := s.(LabeledStep); ok {
			return true
		}
	}
	return false
}

// fit fits the steps; y is nil for an unlabeled fit.
func (p *Pipeline) fit(X *mat.Dense, y, rows []int, wantOut bool) (*mat.Dense, error) {
	if err := stepCheckInput(X, rows); err != nil {
		return nil, fmt.Errorf("datasets: pipeline %s: fit: %w", p, err)
	}
	if r, _ := X.Dims(); y != nil && len(y) != r {
		return nil, fmt.Errorf("datasets: pipeline %s: fit: %d labels for %d rows", p, len(y), r)
	}
	if !wantOut && len(p.Steps) == 0 {
		return nil, nil
	}
	cur := X
	for i, s := range p.Steps {
		var err error
		cs, checked := s.(checkedStep) // cur is checked: the input, or a step's checked output
		if ls, ok := s.(LabeledStep); ok && y != nil {
			err = ls.FitLabeled(cur, y)
		} else if checked {
			err = cs.fitChecked(cur)
		} else {
			err = s.Fit(cur)
		}
		if err != nil {
			return nil, fmt.Errorf("datasets: pipeline %s: fit: %w", p, err)
		}
		if i == len(p.Steps)-1 && !wantOut {
			return nil, nil
		}
		var next *mat.Dense
		if checked {
			next, err = cs.transformChecked(cur, rows)
		} else {
			next, err = s.Transform(cur, rows)
		}
		if err == nil {
			err = stepCheckOutput(s, next, rows)
		}
		if err != nil {
			return nil, fmt.Errorf("datasets: pipeline %s: fit: %w", p, err)
		}
		cur = next
	}
	if cur == X {
		return mat.DenseCopyOf(X), nil
	}
	return cur, nil
}

// Transform applies the fitted steps in order and returns a new matrix.
func (p *Pipeline) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckInput(X, rows); err != nil {
		return nil, fmt.Errorf("datasets: pipeline %s: transform: %w", p, err)
	}
	cur := X
	for _, s := range p.Steps {
		var next *mat.Dense
		var err error
		if cs, ok := s.(checkedStep); ok {
			next, err = cs.transformChecked(cur, rows) // cur is checked, as in fit
		} else {
			next, err = s.Transform(cur, rows)
		}
		if err == nil {
			err = stepCheckOutput(s, next, rows)
		}
		if err != nil {
			return nil, fmt.Errorf("datasets: pipeline %s: transform: %w", p, err)
		}
		cur = next
	}
	if cur == X {
		return mat.DenseCopyOf(X), nil
	}
	return cur, nil
}

// FeatureNames returns the feature names after all steps.
func (p *Pipeline) FeatureNames(in []string) []string {
	out := append([]string(nil), in...)
	for _, s := range p.Steps {
		out = s.FeatureNames(out)
	}
	return out
}

// stepCheckInput verifies that X is a non-empty matrix of finite values and that
// rows, when given, has one id per row of X. A non-finite value is reported
// as a *RowError wrapping ErrNotFiniteValue.
func stepCheckInput(X *mat.Dense, rows []int) error {
	if X == nil || X.IsEmpty() {
		return errors.New("empty feature matrix")
	}
	r, c := X.Dims()
	if rows != nil && len(rows) != r {
		return fmt.Errorf("%d row ids for %d rows", len(rows), r)
	}
	if allFinite(X) {
		return nil
	}
	for i := range r {
		for j := range c {
			if v := X.At(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
				return &RowError{Row: stepRowID(rows, i), Err: fmt.Errorf("feature %d: %w", j, ErrNotFiniteValue)}
			}
		}
	}
	return nil
}

// allFinite reports whether every value of X is finite, in one pass over
// its rows: 0·v is 0 for a finite v and NaN for NaN and ±Inf, and a NaN
// stays in a sum (the steps check every matrix they see, several times
// per fold: this is the cheap test, the search for the culprit runs only
// when it fails).
func allFinite(X *mat.Dense) bool {
	raw := X.RawMatrix()
	for i := range raw.Rows {
		row := raw.Data[i*raw.Stride : i*raw.Stride+raw.Cols]
		var a0, a1, a2, a3 float64 // four sums, so that the additions overlap
		j := 0
		for ; j+4 <= len(row); j += 4 {
			a0 += 0 * row[j]
			a1 += 0 * row[j+1]
			a2 += 0 * row[j+2]
			a3 += 0 * row[j+3]
		}
		for ; j < len(row); j++ {
			a0 += 0 * row[j]
		}
		if a0+a1+a2+a3 != 0 {
			return false
		}
	}
	return true
}

// stepCheckOutput reports the first value of a step's output that is not
// finite (an overflow: every step's input is checked to be finite) as a
// *RowError naming the dataset row and wrapping ErrNotFiniteValue.
func stepCheckOutput(s Step, Z *mat.Dense, rows []int) error {
	if allFinite(Z) {
		return nil
	}
	r, _ := Z.Dims()
	for i := range r {
		for j, v := range Z.RawRowView(i) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%s: %w", s.Name(), &RowError{Row: stepRowID(rows, i),
					Err: fmt.Errorf("output feature %d overflows float64: %w", j, ErrNotFiniteValue)})
			}
		}
	}
	return nil
}

// stepRowID returns the dataset row id of position i.
func stepRowID(rows []int, i int) int {
	if rows == nil {
		return i
	}
	return rows[i]
}

// stepCheckTransform checks fitted state and input of the per-feature steps.
func stepCheckTransform(name string, fittedDim int, X *mat.Dense, rows []int) error {
	if fittedDim == 0 {
		return fmt.Errorf("%s: %w", name, ErrNotFitted)
	}
	if err := stepCheckInput(X, rows); err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	if _, c := X.Dims(); c != fittedDim {
		return fmt.Errorf("%s: fitted on %d features, got %d", name, fittedDim, c)
	}
	return nil
}

// stepCheckFitted is stepCheckTransform for an input already known to be
// a non-empty matrix of finite values (checkedStep).
func stepCheckFitted(name string, fittedDim int, X *mat.Dense, rows []int) error {
	if fittedDim == 0 {
		return fmt.Errorf("%s: %w", name, ErrNotFitted)
	}
	r, c := X.Dims()
	if rows != nil && len(rows) != r {
		return fmt.Errorf("%s: %d row ids for %d rows", name, len(rows), r)
	}
	if c != fittedDim {
		return fmt.Errorf("%s: fitted on %d features, got %d", name, fittedDim, c)
	}
	return nil
}

// checkedStep is a step whose Fit and Transform first check that their
// input is a non-empty matrix of finite values, and which offers the rest
// of them on their own: a Pipeline, which checks its input and the output
// of every step, calls these, so that no matrix is checked twice. The
// results and the other errors are those of Fit and Transform.
type checkedStep interface {
	fitChecked(X *mat.Dense) error
	transformChecked(X *mat.Dense, rows []int) (*mat.Dense, error)
}

var (
	_ checkedStep = (*Standardize)(nil)
	_ checkedStep = (*MinMax)(nil)
	_ checkedStep = (*UnitNorm)(nil)
)

// Standardize is the step "std": each feature is centred on the training mean
// and divided by the training population standard deviation (divisor n, as
// scikit-learn's StandardScaler). A feature that is constant on the training
// rows is centred and left unscaled (scale 1). "Constant" uses
// StandardScaler's test on the variance v of a feature with mean m over n
// rows: v <= n*eps*v + (n*m*eps)^2, eps the float64 machine epsilon, which
// also catches the rounding residue of a column of equal values.
type Standardize struct {
	Mean  []float64 // per-feature training mean
	Scale []float64 // per-feature divisor (standard deviation, or 1)
}

// Name returns "std".
func (s *Standardize) Name() string { return "std" }

// Fit learns the per-feature mean and scale with the corrected two-pass
// algorithm (Chan, Golub & LeVeque 1983), as StandardScaler does. When the
// sum or the sum of squares of a feature overflows (values near the float64
// limit), that feature is computed again on its values divided by their
// largest magnitude and scaled back, so mean and scale are finite for every
// finite input; other features are not affected.
func (s *Standardize) Fit(X *mat.Dense) error {
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("std: %w", err)
	}
	return s.fitChecked(X)
}

func (s *Standardize) fitChecked(X *mat.Dense) error {
	r, c := X.Dims()
	n := float64(r)
	mean := make([]float64, c)
	scale := make([]float64, c)
	col := make([]float64, r)
	for j := range c {
		mat.Col(col, j, X)
		m, sc := stdMoments(col, n, 1)
		if math.IsNaN(m) || math.IsInf(m, 0) || math.IsNaN(sc) || math.IsInf(sc, 0) {
			top := floats.Norm(col, math.Inf(1))
			for i := range col {
				col[i] /= top
			}
			m, sc = stdMoments(col, n, top)
		}
		mean[j], scale[j] = m, sc
	}
	s.Mean, s.Scale = mean, scale
	return nil
}

// stdMoments returns the mean and the scale of the values col times unit:
// the population standard deviation, or 1 when the values are constant by
// StandardScaler's test (see Standardize). With unit = 1 it is the plain
// computation; the near-constant test is homogeneous in the unit, so it
// reads the same on rescaled values.
func stdMoments(col []float64, n, unit float64) (mean, scale float64) {
	m := floats.Sum(col) / n
	var corr, sq float64
	for _, v := range col {
		d := v - m
		corr += d
		sq += d * d
	}
	v := (sq - corr*corr/n) / n
	const eps = 0x1p-52 // float64 machine epsilon, numpy.finfo(float64).eps
	if v <= n*eps*v+(n*m*eps)*(n*m*eps) {
		return m * unit, 1
	}
	return m * unit, math.Sqrt(v) * unit
}

// Transform returns (x - mean) / scale per feature; where x - mean
// overflows, x/scale - mean/scale. A result that still overflows (a test
// value far outside the training range) is left infinite, and Pipeline
// reports it as a *RowError.
func (s *Standardize) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckTransform("std", len(s.Mean), X, rows); err != nil {
		return nil, err
	}
	return s.transformChecked(X, rows)
}

func (s *Standardize) transformChecked(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckFitted("std", len(s.Mean), X, rows); err != nil {
		return nil, err
	}
	r, c := X.Dims()
	out := mat.NewDense(r, c, nil)
	mean, scale := s.Mean[:c], s.Scale[:c]
	for i := range r {
		dst, src := out.RawRowView(i)[:c], X.RawRowView(i)[:c]
		for j, x := range src {
			v := (x - mean[j]) / scale[j]
			if math.IsInf(v, 0) || math.IsNaN(v) {
				v = x/scale[j] - mean[j]/scale[j] // x - mean overflowed
			}
			dst[j] = v
		}
	}
	return out, nil
}

// FeatureNames returns the names unchanged.
func (s *Standardize) FeatureNames(in []string) []string { return append([]string(nil), in...) }

// MinMax is the step "minmax": each feature is mapped to [0,1] by
// (x - min) / (max - min) with the training minimum and maximum. Test values
// outside the training range map outside [0,1]; nothing is clipped (as
// scikit-learn's MinMaxScaler with its default clip=False). A feature whose
// training range is below 10*eps (eps the float64 machine epsilon, the
// threshold of MinMaxScaler) is shifted by its minimum and left unscaled
// (scale 1).
//
// When max - min overflows (values of both signs near the float64 limit),
// Range is +Inf and Transform computes (x/2 - min/2) / (max/2 - min/2)
// for that feature instead.
type MinMax struct {
	Min   []float64 // per-feature training minimum
	Range []float64 // per-feature divisor (max - min, or 1)
	half  []float64 // max/2 - min/2 where Range overflowed, else 0
}

// Name returns "minmax".
func (s *MinMax) Name() string { return "minmax" }

// Fit learns the per-feature minimum and range.
func (s *MinMax) Fit(X *mat.Dense) error {
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("minmax: %w", err)
	}
	return s.fitChecked(X)
}

func (s *MinMax) fitChecked(X *mat.Dense) error {
	r, c := X.Dims()
	lo := make([]float64, c)
	rng := make([]float64, c)
	half := make([]float64, c)
	col := make([]float64, r)
	for j := range c {
		mat.Col(col, j, X)
		lo[j] = floats.Min(col)
		hi := floats.Max(col)
		rng[j] = hi - lo[j]
		if rng[j] < 10*0x1p-52 {
			rng[j] = 1
		}
		if math.IsInf(rng[j], 1) {
			half[j] = hi/2 - lo[j]/2
		}
	}
	s.Min, s.Range, s.half = lo, rng, half
	return nil
}

// Transform returns (x - min) / range per feature.
func (s *MinMax) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckTransform("minmax", len(s.Min), X, rows); err != nil {
		return nil, err
	}
	return s.transformChecked(X, rows)
}

func (s *MinMax) transformChecked(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckFitted("minmax", len(s.Min), X, rows); err != nil {
		return nil, err
	}
	r, c := X.Dims()
	out := mat.NewDense(r, c, nil)
	for i := range r {
		dst, src := out.RawRowView(i)[:c], X.RawRowView(i)[:c]
		for j, x := range src {
			if j < len(s.half) && s.half[j] != 0 {
				dst[j] = (x/2 - s.Min[j]/2) / s.half[j]
				continue
			}
			dst[j] = (x - s.Min[j]) / s.Range[j]
		}
	}
	return out, nil
}

// FeatureNames returns the names unchanged.
func (s *MinMax) FeatureNames(in []string) []string { return append([]string(nil), in...) }

// UnitNorm is the step "l2": each row is divided by its Euclidean norm. The
// row is first divided by its largest magnitude, so no finite input
// overflows or underflows. A row of zeros is an error: a *RowError naming
// the dataset row and wrapping ErrZeroVector; no NaN is ever produced. The
// step has nothing to learn: Fit only checks its input and Transform needs
// no Fit.
type UnitNorm struct{}

// Name returns "l2".
func (s *UnitNorm) Name() string { return "l2" }

// Fit checks X and learns nothing.
func (s *UnitNorm) Fit(X *mat.Dense) error {
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("l2: %w", err)
	}
	return nil
}

func (s *UnitNorm) fitChecked(*mat.Dense) error { return nil }

// Transform scales each row to unit Euclidean norm.
func (s *UnitNorm) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckInput(X, rows); err != nil {
		return nil, fmt.Errorf("l2: %w", err)
	}
	return s.transformChecked(X, rows)
}

func (s *UnitNorm) transformChecked(X *mat.Dense, rows []int) (*mat.Dense, error) {
	r, c := X.Dims()
	if rows != nil && len(rows) != r {
		return nil, fmt.Errorf("l2: %d row ids for %d rows", len(rows), r)
	}
	out := mat.NewDense(r, c, nil)
	for i := range r {
		row := out.RawRowView(i)
		copy(row, X.RawRowView(i))
		if !unitScale(row) {
			return nil, fmt.Errorf("l2: %w", &RowError{Row: stepRowID(rows, i), Err: ErrZeroVector})
		}
	}
	return out, nil
}

// unitScale scales the finite vector v in place to unit Euclidean norm and
// reports whether it could (false: v is all zeros, left unchanged). Dividing
// by the largest magnitude first keeps the sum of squares in range.
func unitScale(v []float64) bool {
	// The largest magnitude, as floats.Norm(v, Inf) computes it (math.Max
	// of the magnitudes; for finite values a plain comparison gives the
	// same number).
	var top float64
	for _, x := range v {
		if a := math.Abs(x); a > top {
			top = a
		}
	}
	if top == 0 {
		return false
	}
	for i := range v {
		v[i] /= top // division, not 1/top: 1/top overflows for subnormal top
	}
	nrm := floats.Norm(v, 2) // in [1, sqrt(len(v))]
	for i := range v {
		v[i] /= nrm
	}
	return true
}

// FeatureNames returns the names unchanged.
func (s *UnitNorm) FeatureNames(in []string) []string { return append([]string(nil), in...) }

// Pad is the step "pad": zero features are appended so that the feature
// count becomes the next power of two (unchanged if it already is one). The
// width is learned at Fit; the added features are named pad1, pad2, ...
type Pad struct {
	In, Out int // feature counts before and after padding (0 before Fit)
}

// Name returns "pad".
func (s *Pad) Name() string { return "pad" }

// Fit learns the input and padded widths.
func (s *Pad) Fit(X *mat.Dense) error {
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("pad: %w", err)
	}
	_, c := X.Dims()
	s.In, s.Out = c, padWidth(c)
	return nil
}

// Transform appends the zero features.
func (s *Pad) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckTransform("pad", s.In, X, rows); err != nil {
		return nil, err
	}
	r, c := X.Dims()
	out := mat.NewDense(r, s.Out, nil)
	out.Slice(0, r, 0, c).(*mat.Dense).Copy(X)
	return out, nil
}

// FeatureNames appends pad1, pad2, ... up to the next power of two of
// len(in).
func (s *Pad) FeatureNames(in []string) []string {
	out := append([]string(nil), in...)
	for k := 1; len(out) < padWidth(len(in)); k++ {
		out = append(out, "pad"+strconv.Itoa(k))
	}
	return out
}

// padWidth returns the smallest power of two >= n (1 for n <= 1).
func padWidth(n int) int {
	p := 1
	for p < n {
		p <<= 1
	}
	return p
}

// Lift is the step "lift(c)": the constant feature C > 0 is appended and the
// row is scaled to unit Euclidean norm,
//
//	x -> (x, C) / sqrt(|x|^2 + C^2),
//
// so that, unlike "l2", the original norm survives: it is the angle to the
// new axis, |x| = C * |x'_{1..d}| / x'_{d+1}. No row is ever zero since C > 0.
// When |x| is so large against C that x'_{d+1} underflows to 0 the norm is no
// longer recoverable, but the output is still a finite unit vector (the row
// is scaled as in "l2", so nothing overflows). Nothing is learned; Fit only
// checks its input.
type Lift struct {
	C float64 // the appended constant; written "lift" when 1
}

// Name returns "lift" for C = 1 and "lift(C)" otherwise, with C in the
// shortest decimal form that parses back to the same float64. A positive
// exponent is written without its '+' (lift(1e7)), since '+' joins steps.
func (s *Lift) Name() string {
	if s.C == 1 {
		return "lift"
	}
	return "lift(" + strings.Replace(strconv.FormatFloat(s.C, 'g', -1, 64), "e+", "e", 1) + ")"
}

// Fit checks X and C and learns nothing.
func (s *Lift) Fit(X *mat.Dense) error {
	if err := s.check(); err != nil {
		return err
	}
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("%s: %w", s.Name(), err)
	}
	return nil
}

func (s *Lift) check() error {
	if !(s.C > 0) || math.IsInf(s.C, 0) {
		return fmt.Errorf("%s: constant must be finite and > 0: %w", s.Name(), ErrStepParam)
	}
	return nil
}

// Transform appends C and scales each row to unit norm.
func (s *Lift) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := s.check(); err != nil {
		return nil, err
	}
	if err := stepCheckInput(X, rows); err != nil {
		return nil, fmt.Errorf("%s: %w", s.Name(), err)
	}
	r, c := X.Dims()
	out := mat.NewDense(r, c+1, nil)
	for i := range r {
		row := out.RawRowView(i)
		mat.Row(row[:c], i, X)
		row[c] = s.C
		unitScale(row) // never all zeros: C > 0
	}
	return out, nil
}

// FeatureNames appends "lift".
func (s *Lift) FeatureNames(in []string) []string {
	return append(append([]string(nil), in...), "lift")
}

// RowNorm is the step "norm": each row x is replaced by the single feature
// ||x||, its Euclidean norm (computed as in "l2", scaled by the largest
// magnitude first, so no finite input overflows). It is the part of the
// data that "l2" discards: a classifier on the output of "std+norm" shows
// how much the class depends on the norm of the standardised vectors. A
// zero row gives 0, which is no error here. Nothing is learned; Fit only
// checks its input.
type RowNorm struct{}

// Name returns "norm".
func (s *RowNorm) Name() string { return "norm" }

// Fit checks X and learns nothing.
func (s *RowNorm) Fit(X *mat.Dense) error {
	if err := stepCheckInput(X, nil); err != nil {
		return fmt.Errorf("norm: %w", err)
	}
	return nil
}

// Transform returns the n x 1 matrix of row norms.
func (s *RowNorm) Transform(X *mat.Dense, rows []int) (*mat.Dense, error) {
	if err := stepCheckInput(X, rows); err != nil {
		return nil, fmt.Errorf("norm: %w", err)
	}
	r, _ := X.Dims()
	out := mat.NewDense(r, 1, nil)
	for i := range r {
		v := X.RawRowView(i)
		top := floats.Norm(v, math.Inf(1))
		if top == 0 {
			continue
		}
		var sq float64
		for _, x := range v {
			q := x / top
			sq += q * q
		}
		out.Set(i, 0, top*math.Sqrt(sq))
	}
	return out, nil
}

// FeatureNames returns the single name "norm".
func (s *RowNorm) FeatureNames([]string) []string { return []string{"norm"} }
