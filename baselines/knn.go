package baselines

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// Metric is the distance a KNN model measures between two rows.
type Metric int

const (
	// Euclidean is the L2 distance sqrt(sum_j (a_j - b_j)^2). The default.
	Euclidean Metric = iota
	// Manhattan is the L1 distance sum_j |a_j - b_j|.
	Manhattan
	// Cosine is 1 - <a, b> / (||a|| ||b||); a zero vector is an error.
	Cosine
)

var metricNames = [...]string{Euclidean: "euclidean", Manhattan: "manhattan", Cosine: "cosine"}

// String returns the name ParseMetric accepts, or "Metric(n)" for a value
// outside the enumeration.
func (m Metric) String() string {
	if m >= 0 && int(m) < len(metricNames) {
		return metricNames[m]
	}
	return fmt.Sprintf("Metric(%d)", int(m))
}

// ParseMetric returns the Metric named s ("euclidean", "manhattan" or
// "cosine"; case and surrounding space are ignored). An unknown name is an
// error wrapping ErrParam.
func ParseMetric(s string) (Metric, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for i, name := range metricNames {
		if t == name {
			return Metric(i), nil
		}
	}
	return 0, fmt.Errorf("baselines: unknown metric %q (want euclidean, manhattan or cosine): %w", s, ErrParam)
}

// Weighting says how the k nearest neighbours' votes are weighted.
type Weighting int

const (
	// Uniform gives every neighbour one vote. The default.
	Uniform Weighting = iota
	// Distance gives a neighbour at distance d the vote 1/d; when some
	// neighbours lie at distance zero, they alone vote, one vote each.
	Distance
)

var weightingNames = [...]string{Uniform: "uniform", Distance: "distance"}

// String returns the name ParseWeighting accepts, or "Weighting(n)" for a
// value outside the enumeration.
func (w Weighting) String() string {
	if w >= 0 && int(w) < len(weightingNames) {
		return weightingNames[w]
	}
	return fmt.Sprintf("Weighting(%d)", int(w))
}

// ParseWeighting returns the Weighting named s ("uniform" or "distance"; case
// and surrounding space are ignored). An unknown name is an error wrapping
// ErrParam.
func ParseWeighting(s string) (Weighting, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for i, name := range weightingNames {
		if t == name {
			return Weighting(i), nil
		}
	}
	return 0, fmt.Errorf("baselines: unknown weighting %q (want uniform or distance): %w", s, ErrParam)
}

// DefaultK is the number of neighbours a KNN with K == 0 uses.
const DefaultK = 5

// KNN is the k-nearest-neighbour classifier (exact: brute force or a k-d
// tree, with the same answers).
//
// The zero value is a 5-nearest-neighbour classifier with Euclidean distance
// and uniform votes. Distances are computed directly (sums of squared or
// absolute differences in feature order), so a duplicate of a training row
// is at distance exactly zero. Under the Euclidean distance a cheaper
// estimate picks the rows worth computing first: ||t||^2 + ||x||^2 - 2<t, x>
// from one matrix-vector product over all training rows, with a bound on its
// rounding error; only rows whose estimate can be within the k nearest get
// the direct sum, so the neighbours, their order and their distances are
// exactly those of the direct computation over every row (see nearest).
//
// Ties (common practice): neighbours are
// ordered by distance and then by training row index, so among training
// rows at the same distance as the k-th neighbour the ones that come first
// are kept; a vote tie goes to the lowest class index. scikit-learn 1.2.1's
// brute-force KNeighborsClassifier breaks vote ties the same way and
// usually picks the same neighbours, but not always: its fixed-size max-heap
// (sklearn/utils/_heap.pyx) is keyed on the distance alone, so when several
// rows tie at the k-th distance and a nearer row arrives later, the tied row
// it drops depends on the heap layout rather than on the index.
//
// Search (Method). Brute force computes the key of every training row
// (Euclidean: of the rows the estimate lets through). The k-d tree
// (Friedman, Bentley & Finkel 1977; see kdTree) computes the keys of the
// rows in the leaves it cannot rule out with a bound on their box, and
// returns the same k smallest (key, index) pairs: the same neighbours, the
// same distances bit for bit, the same order and ties, hence the same
// predictions and vote fractions. Under Cosine the tree is built on the
// rows scaled to unit length, where the cosine distance is half the
// squared Euclidean distance (see cosineLowerBound). KNNAuto (the default)
// uses the tree for calls on at least 512 test rows when the training part
// has at least 1024 rows and at most 32 features and a probe of 32
// training rows shows that the tree does less than 0.2 of brute force's
// work; the rule and its measured constants are at kdMinRows. MethodUsed
// reports the choice. Measured at n = 50000 (BenchmarkKNNDim): on ten
// separated class clouds the tree takes 0.006 (d = 2), 0.19 (d = 8), 0.41
// (d = 16) and 0.6 (d = 32) of brute force's time; on one Gaussian cloud
// 0.005 (d = 2), 0.3 (d = 8), about 1 (d = 12) and 2.5 to 6 (d >= 16),
// where the rule keeps brute force.
//
// Fit copies the training data; the model is safe for concurrent Predict
// calls after Fit returns (KNNAuto builds its tree under a lock, once).
type KNN struct {
	// K is the number of neighbours; 0 means DefaultK. K larger than the
	// number of training rows is an error at Fit.
	K int
	// Metric is the distance; the zero value is Euclidean.
	Metric Metric
	// Weights is the vote weighting; the zero value is Uniform.
	Weights Weighting
	// Method is the neighbour search; the zero value is KNNAuto.
	Method KNNMethod

	k      int
	n, d   int
	nClass int
	x      []float64 // training rows, row-major n x d
	y      []int
	norms  []float64 // Euclidean norms of the training rows (Cosine only)
	sq     []float64 // squared Euclidean norms of the training rows (Euclidean only)
	sqMax  float64   // largest of sq
	tree   *kdTree   // built at Fit (KNNTree), or nil
	auto   *knnAuto  // KNNAuto's deferred choice, or nil (brute force)
	fitted bool
}

var _ Model = (*KNN)(nil)

// Fit stores the training data. It returns an error wrapping ErrParam for an
// invalid option or K larger than the number of rows, and one wrapping
// ErrData for inconsistent or non-finite data, or a zero row under the
// Cosine metric.
func (m *KNN) Fit(X *mat.Dense, y []int, nClass int) error {
	m.fitted = false
	k := m.K
	switch {
	case k == 0:
		k = DefaultK
	case k < 0:
		return fmt.Errorf("baselines: knn: k = %d is negative: %w", m.K, ErrParam)
	}
	if m.Metric < Euclidean || m.Metric > Cosine {
		return fmt.Errorf("baselines: knn: unknown metric %v: %w", m.Metric, ErrParam)
	}
	if m.Weights < Uniform || m.Weights > Distance {
		return fmt.Errorf("baselines: knn: unknown weighting %v: %w", m.Weights, ErrParam)
	}
	if m.Method < KNNAuto || m.Method > KNNTree {
		return fmt.Errorf("baselines: knn: unknown search method %v: %w", m.Method, ErrParam)
	}
	n, d, err := validateFitArgs("knn", X, y, nClass)
	if err != nil {
		return err
	}
	if k > n {
		return fmt.Errorf("baselines: knn: k = %d exceeds the n = %d training rows: %w", k, n, ErrParam)
	}
	x := make([]float64, n*d)
	for i := range n {
		copy(x[i*d:(i+1)*d], X.RawRowView(i))
	}
	var norms []float64
	if m.Metric == Cosine {
		norms = make([]float64, n)
		for i := range n {
			norms[i] = math.Sqrt(rowDot(x[i*d:(i+1)*d], x[i*d:(i+1)*d]))
			if norms[i] == 0 {
				return fmt.Errorf("baselines: knn: training row %d is a zero vector, cosine distance undefined: %w", i, ErrData)
			}
		}
	}
	var sq []float64
	var sqMax float64
	if m.Metric == Euclidean {
		sq = make([]float64, n)
		for i := range n {
			sq[i] = rowDot(x[i*d:(i+1)*d], x[i*d:(i+1)*d])
			sqMax = max(sqMax, sq[i])
		}
	}
	m.k, m.n, m.d, m.nClass = k, n, d, nClass
	m.x, m.y, m.norms, m.sq, m.sqMax = x, append([]int(nil), y...), norms, sq, sqMax
	m.tree, m.auto = nil, nil
	m.chooseMethod()
	m.fitted = true
	return nil
}

// Predict returns the majority class of the k nearest training rows of each
// row of X (ties as described on KNN).
func (m *KNN) Predict(X *mat.Dense) ([]int, error) {
	if err := m.checkPredict(X); err != nil {
		return nil, err
	}
	r, _ := X.Dims()
	pred := make([]int, r)
	s := m.newScratch(r)
	for i := range r {
		c, err := m.votes(s, X.RawRowView(i), i)
		if err != nil {
			return nil, err
		}
		pred[i] = firstArgmax(c)
	}
	return pred, nil
}

// PredictProba returns, for each row of X, the vote fraction of each class
// among its k nearest training rows (weighted as Weights says): a matrix of
// rows(X) x nClass whose rows sum to 1. Predict returns the column with the
// largest fraction, the lowest index among equals.
func (m *KNN) PredictProba(X *mat.Dense) (*mat.Dense, error) {
	if err := m.checkPredict(X); err != nil {
		return nil, err
	}
	r, _ := X.Dims()
	p := mat.NewDense(r, m.nClass, nil)
	s := m.newScratch(r)
	for i := range r {
		c, err := m.votes(s, X.RawRowView(i), i)
		if err != nil {
			return nil, err
		}
		var tot float64
		for _, v := range c {
			tot += v
		}
		row := p.RawRowView(i)
		for j, v := range c {
			row[j] = v / tot
		}
	}
	return p, nil
}

// Neighbors returns the training row indices of the k nearest neighbours of
// each row of X, nearest first (ties by training index), and their distances.
func (m *KNN) Neighbors(X *mat.Dense) (idx [][]int, dist [][]float64, err error) {
	if err := m.checkPredict(X); err != nil {
		return nil, nil, err
	}
	r, _ := X.Dims()
	s := m.newScratch(r)
	idx, dist = make([][]int, r), make([][]float64, r)
	for i := range r {
		if err := m.nearest(s, X.RawRowView(i), i); err != nil {
			return nil, nil, err
		}
		h := s.heap
		// Pop the max-heap from the back to get nearest-first order.
		idx[i], dist[i] = make([]int, len(h)), make([]float64, len(h))
		for j := len(h) - 1; j >= 0; j-- {
			idx[i][j], dist[i][j] = h[0].idx, m.distance(h[0].key)
			h[0] = h[len(h)-1]
			h = h[:len(h)-1]
			knnSiftDown(h, 0)
		}
	}
	return idx, dist, nil
}

func (m *KNN) checkPredict(X *mat.Dense) error {
	if !m.fitted {
		return fmt.Errorf("baselines: knn: %w", ErrNotFitted)
	}
	return validatePredictArgs("knn", X, m.d)
}

// knnScratch is the per-call working memory of Predict.
type knnScratch struct {
	heap  knnHeap
	count []float64
	est   []float64 // estimated squared distances to every training row (Euclidean)
	top   []float64 // max-heap of the k smallest estimates
	tree  *kdTree   // the tree this call searches, or nil
	stack []kdEntry // tree search
	unit  []float64 // tree search under Cosine: the test row scaled to unit length
}

// newScratch returns the working memory of a call on rows test rows, with
// the tree the call uses (nil: brute force; see KNN.treeFor).
func (m *KNN) newScratch(rows int) *knnScratch {
	s := &knnScratch{heap: make(knnHeap, 0, m.k), count: make([]float64, m.nClass),
		tree: m.treeFor(rows)}
	if s.tree != nil {
		s.stack = make([]kdEntry, 0, 64)
		s.unit = make([]float64, m.d)
	}
	if m.Metric == Euclidean && s.tree == nil {
		s.est = make([]float64, m.n)
		s.top = make([]float64, 0, m.k)
	}
	return s
}

// neighbour is a training row and its ordering key: the squared Euclidean
// distance, the Manhattan distance or the cosine distance.
type neighbour struct {
	key float64
	idx int
}

// knnHeap is a max-heap of neighbours ordered by (key, idx): the root is the
// neighbour that leaves first when a nearer one arrives.
type knnHeap []neighbour

func (a neighbour) after(b neighbour) bool {
	return a.key > b.key || (a.key == b.key && a.idx > b.idx)
}

func knnSiftDown(h knnHeap, i int) {
	n := len(h)
	for {
		l := 2*i + 1
		if l >= n {
			return
		}
		j := l
		if r := l + 1; r < n && h[r].after(h[l]) {
			j = r
		}
		if !h[j].after(h[i]) {
			return
		}
		h[i], h[j] = h[j], h[i]
		i = j
	}
}

func knnSiftUp(h knnHeap, i int) {
	for i > 0 {
		p := (i - 1) / 2
		if !h[i].after(h[p]) {
			return
		}
		h[i], h[p] = h[p], h[i]
		i = p
	}
}

// nearest fills s.heap with the k nearest training rows of t. Training rows
// are scanned in index order and a row displaces the current k-th neighbour
// only when strictly nearer, so ties at the boundary keep the lower indices:
// the heap ends up holding the k smallest (key, index) pairs. The Euclidean
// and Manhattan sums stop early once they exceed the current k-th key:
// floating-point addition of non-negative terms never decreases, so the
// partial sum is a lower bound of the full one and the result is exact.
//
// Under the Euclidean metric only the rows that survive a filter are scanned
// (see candidates); the filter keeps every row that can be among the k
// smallest pairs, so the result is the same as scanning all rows.
func (m *KNN) nearest(s *knnScratch, t []float64, row int) error {
	d, k := m.d, m.k
	h := s.heap[:0]
	var tnorm float64
	if m.Metric == Cosine {
		tnorm = math.Sqrt(rowDot(t, t))
		if tnorm == 0 {
			return fmt.Errorf("baselines: knn: test row %d is a zero vector, cosine distance undefined: %w", row, ErrData)
		}
	}
	if s.tree != nil && (m.Metric != Cosine || cosineNormOK(tnorm)) {
		s.tree.search(s, t, tnorm, k)
		return nil
	}
	thr := math.Inf(1)
	if m.Metric == Euclidean {
		thr = m.candidates(s, t)
	}
	bound := math.Inf(1)
	for i := range m.n {
		if thr < math.Inf(1) && s.est[i] > thr {
			continue
		}
		xi := m.x[i*d : (i+1)*d : (i+1)*d]
		var key float64
		switch m.Metric {
		case Euclidean:
			key = sqDistBounded(xi, t, bound)
		case Manhattan:
			key = l1DistBounded(xi, t, bound)
		case Cosine:
			// Clipped to [0, 2] as scikit-learn 1.2.1
			// metrics.pairwise.cosine_distances does, so that rounding
			// cannot order a near-duplicate before an exact one.
			key = min(max(1-rowDot(xi, t)/(m.norms[i]*tnorm), 0), 2)
		}
		if len(h) < k {
			h = append(h, neighbour{key, i})
			knnSiftUp(h, len(h)-1)
			if len(h) == k {
				bound = h[0].key
			}
			continue
		}
		if key < h[0].key {
			h[0] = neighbour{key, i}
			knnSiftDown(h, 0)
			bound = h[0].key
		}
	}
	s.heap = h
	return nil
}

// candidates sets s.est[i] to an estimate e_i of the squared Euclidean
// distance from t to training row i, ||t||^2 + ||x_i||^2 - 2<t, x_i> with
// the inner products from one matrix-vector product (gonum's assembly
// Dgemv), and returns a threshold: every row whose computed squared distance
// D_i (the direct sum sqDistBounded forms) can be among the k smallest has
// e_i <= threshold. It returns +Inf (no filtering) when the norms overflow.
//
// Why. Let delta bound |e_i - D_i| for every i. With S the k rows of the
// smallest estimates and e_(k) the largest of those, the k-th smallest D is
// at most max over S of D_s <= e_(k) + delta; a row i with D_i at most that
// (among the k nearest, or tied with the k-th) has e_i <= D_i + delta <=
// e_(k) + 2 delta, the threshold.
//
// delta. Let T = ||t||^2, X = ||x_i||^2, u = 2^-53 and g = (d+2)u/(1-(d+2)u).
// In any summation order the computed T, X and inner product are within
// g T, g X and g (T + X)/2 (Cauchy-Schwarz and 2|t||x| <= T + X) of their
// values; the sum and difference forming e_i add at most 3u(1 + g)^2 (T + X);
// and D_i, a sum of d rounded squares of rounded differences, is within
// g ||t - x_i||^2 <= 2g (T + X) of the exact squared distance. Altogether
// |e_i - D_i| <= (4g + 4u)(T + X) < 8 (d + 2) u (T + max_i X) for (d+2)u <
// 1/100. Underflow adds at most 2^-1075 per rounded product (sums of
// subnormals are exact), at most 4d products: 8 (d + 2) 2^-1074 covers it.
func (m *KNN) candidates(s *knnScratch, t []float64) float64 {
	n, d, k := m.n, m.d, m.k
	tsq := rowDot(t, t)
	slack := 8 * float64(d+2) * (0x1p-53*(tsq+m.sqMax) + math.SmallestNonzeroFloat64)
	if !(tsq+m.sqMax+slack < math.Inf(1)) || float64(d+2)*0x1p-53 >= 0.01 {
		return math.Inf(1)
	}
	est := s.est[:n]
	xm := blas64.General{Rows: n, Cols: d, Stride: d, Data: m.x}
	blas64.Gemv(blas.NoTrans, 1, xm, blas64.Vector{N: d, Inc: 1, Data: t}, 0, blas64.Vector{N: n, Inc: 1, Data: est})
	top := s.top[:0] // max-heap of the k smallest estimates
	sq := m.sq[:n]
	for i, ip := range est {
		e := tsq + sq[i] - 2*ip
		est[i] = e
		if len(top) < k {
			top = append(top, e)
			for j := len(top) - 1; j > 0 && top[(j-1)/2] < top[j]; j = (j - 1) / 2 {
				top[j], top[(j-1)/2] = top[(j-1)/2], top[j]
			}
			continue
		}
		if e >= top[0] {
			continue
		}
		top[0] = e
		for j := 0; ; {
			c := 2*j + 1
			if c >= k {
				break
			}
			if c+1 < k && top[c+1] > top[c] {
				c++
			}
			if !(top[c] > top[j]) {
				break
			}
			top[j], top[c] = top[c], top[j]
			j = c
		}
	}
	s.top = top
	return top[0] + 2*slack
}

// distance converts an ordering key to the metric's distance.
func (m *KNN) distance(key float64) float64 {
	if m.Metric == Euclidean {
		return math.Sqrt(key)
	}
	return key
}

// votes returns the (weighted) vote of each class among the k nearest
// training rows of t. The slice is s.count, reused by the next call.
func (m *KNN) votes(s *knnScratch, t []float64, row int) ([]float64, error) {
	if err := m.nearest(s, t, row); err != nil {
		return nil, err
	}
	c := s.count
	clear(c)
	if m.Weights == Uniform {
		for _, nb := range s.heap {
			c[m.y[nb.idx]]++
		}
		return c, nil
	}
	// Distance weights, as scikit-learn 1.2.1 neighbors._base._get_weights:
	// 1/d, except that neighbours at distance zero, if any, vote alone with
	// weight 1 each. The weights are added nearest first (ties by index),
	// so that the sums do not depend on the heap's layout, which differs
	// between the search methods.
	slices.SortFunc(s.heap, func(a, b neighbour) int {
		if c := cmp.Compare(a.key, b.key); c != 0 {
			return c
		}
		return cmp.Compare(a.idx, b.idx)
	})
	zero := false
	for _, nb := range s.heap {
		if m.distance(nb.key) <= 0 {
			zero = true
			c[m.y[nb.idx]]++
		}
	}
	if zero {
		return c, nil
	}
	for _, nb := range s.heap {
		c[m.y[nb.idx]] += 1 / m.distance(nb.key)
	}
	return c, nil
}

// firstArgmax returns the index of the largest element, the first among
// equals. It panics on an empty slice (internal invariant).
func firstArgmax(v []float64) int {
	best := 0
	for i := 1; i < len(v); i++ {
		if v[i] > v[best] {
			best = i
		}
	}
	return best
}

func rowDot(a, b []float64) float64 {
	b = b[:len(a)]
	var s0, s1, s2, s3 float64
	j := 0
	for ; j+4 <= len(a); j += 4 {
		s0 += a[j] * b[j]
		s1 += a[j+1] * b[j+1]
		s2 += a[j+2] * b[j+2]
		s3 += a[j+3] * b[j+3]
	}
	for ; j < len(a); j++ {
		s0 += a[j] * b[j]
	}
	return (s0 + s1) + (s2 + s3)
}

// sqDistBounded returns sum_j (a_j - b_j)^2, or, as soon as a partial sum
// exceeds bound, that partial sum. The terms go to four accumulators
// combined as (s0+s1)+(s2+s3); each accumulator only grows and
// floating-point addition is monotone, so a partial combination never
// exceeds the full one, and the value of a full sum does not depend on bound.
func sqDistBounded(a, b []float64, bound float64) float64 {
	b = b[:len(a)]
	var s0, s1, s2, s3 float64
	j := 0
	for ; j+8 <= len(a); j += 8 {
		d0, d1, d2, d3 := a[j]-b[j], a[j+1]-b[j+1], a[j+2]-b[j+2], a[j+3]-b[j+3]
		s0 += d0 * d0
		s1 += d1 * d1
		s2 += d2 * d2
		s3 += d3 * d3
		d0, d1, d2, d3 = a[j+4]-b[j+4], a[j+5]-b[j+5], a[j+6]-b[j+6], a[j+7]-b[j+7]
		s0 += d0 * d0
		s1 += d1 * d1
		s2 += d2 * d2
		s3 += d3 * d3
		if (s0+s1)+(s2+s3) > bound {
			return (s0 + s1) + (s2 + s3)
		}
	}
	for ; j < len(a); j++ {
		d := a[j] - b[j]
		s0 += d * d
	}
	return (s0 + s1) + (s2 + s3)
}

// l1DistBounded is sqDistBounded for sum_j |a_j - b_j|.
func l1DistBounded(a, b []float64, bound float64) float64 {
	b = b[:len(a)]
	var s0, s1, s2, s3 float64
	j := 0
	for ; j+8 <= len(a); j += 8 {
		s0 += math.Abs(a[j] - b[j])
		s1 += math.Abs(a[j+1] - b[j+1])
		s2 += math.Abs(a[j+2] - b[j+2])
		s3 += math.Abs(a[j+3] - b[j+3])
		s0 += math.Abs(a[j+4] - b[j+4])
		s1 += math.Abs(a[j+5] - b[j+5])
		s2 += math.Abs(a[j+6] - b[j+6])
		s3 += math.Abs(a[j+7] - b[j+7])
		if (s0+s1)+(s2+s3) > bound {
			return (s0 + s1) + (s2 + s3)
		}
	}
	for ; j < len(a); j++ {
		s0 += math.Abs(a[j] - b[j])
	}
	return (s0 + s1) + (s2 + s3)
}

// validateFitArgs checks the arguments of a Fit call: a non-empty matrix of
// finite values, one label per row, labels in [0, nClass). It returns the
// matrix dimensions. Errors wrap ErrData and name the model.
func validateFitArgs(model string, X *mat.Dense, y []int, nClass int) (n, d int, err error) {
	if X == nil || X.IsEmpty() {
		return 0, 0, fmt.Errorf("baselines: %s: empty training matrix: %w", model, ErrData)
	}
	n, d = X.Dims()
	if len(y) != n {
		return 0, 0, fmt.Errorf("baselines: %s: %d labels for %d training rows: %w", model, len(y), n, ErrData)
	}
	if nClass < 1 {
		return 0, 0, fmt.Errorf("baselines: %s: %d classes: %w", model, nClass, ErrData)
	}
	for i, c := range y {
		if c < 0 || c >= nClass {
			return 0, 0, fmt.Errorf("baselines: %s: label %d of training row %d outside [0, %d): %w", model, c, i, nClass, ErrData)
		}
	}
	if err := checkFiniteMatrix(model, "training", X); err != nil {
		return 0, 0, err
	}
	return n, d, nil
}

// validatePredictArgs checks the matrix of a Predict call: non-empty, d
// columns, finite. Errors wrap ErrData and name the model.
func validatePredictArgs(model string, X *mat.Dense, d int) error {
	if X == nil || X.IsEmpty() {
		return fmt.Errorf("baselines: %s: empty test matrix: %w", model, ErrData)
	}
	if _, c := X.Dims(); c != d {
		return fmt.Errorf("baselines: %s: test matrix has %d columns, training matrix had %d: %w", model, c, d, ErrData)
	}
	return checkFiniteMatrix(model, "test", X)
}

func checkFiniteMatrix(model, what string, X *mat.Dense) error {
	r, _ := X.Dims()
	for i := range r {
		// 0*v is 0 for finite v and NaN for NaN or ±Inf, and NaN stays in
		// a sum: one multiply-add per entry (four sums, so that the
		// additions overlap), the column search only on failure.
		var a0, a1, a2, a3 float64
		row := X.RawRowView(i)
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
		if a0+a1+a2+a3 == 0 {
			continue
		}
		for j, v := range row {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("baselines: %s: %s row %d column %d is %v: %w", model, what, i, j, v, ErrData)
			}
		}
	}
	return nil
}

// classesPresent returns, for each class index in [0, nClass), whether some
// label in y has it, and how many classes are present.
func classesPresent(y []int, nClass int) (present []bool, count int) {
	present = make([]bool, nClass)
	for _, c := range y {
		if !present[c] {
			present[c] = true
			count++
		}
	}
	return present, count
}
