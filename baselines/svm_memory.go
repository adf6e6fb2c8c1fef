package baselines

import (
	"errors"
	"fmt"
)

// SVMStats reports the work of an SVM's last successful fit.
type SVMStats struct {
	Tasks       int   // two-class tasks (one-vs-one pairs of present classes)
	Iterations  int   // two-variable updates over all tasks
	KernelEvals int64 // kernel evaluations spent on training rows over all tasks
	Shrinks     int   // shrinking passes over all tasks (0 with NoShrinking)
}

// Stats returns the work of the last successful Fit (zero before one).
func (s *SVM) Stats() SVMStats {
	if s.fit == nil {
		return SVMStats{}
	}
	return SVMStats{Tasks: len(s.fit.tasks), Iterations: s.fit.iter, KernelEvals: s.fit.evals, Shrinks: s.fit.shrinks}
}

// Per-row byte counts of the memory estimate (see MemoryBytes), from the
// allocations in svm.go, svm_cache.go and svm_solver.go.
const (
	// One two-class task of m rows: index and label (16), point headers
	// (24), the cache's squared norms, diagonal, permutation and row table
	// (32), the solver's multipliers, labels, v, w̄, gradient, warm start
	// and results (64), two flags (2), and one cacheRow header per cached
	// row (48).
	taskBytesPerRow = 16 + 24 + 32 + 64 + 2 + 48
	// The whole fit of n rows: point headers (24), class lists (8), the
	// support-vector flags and positions (9) and squared norms (8).
	fitBytesPerRow = 24 + 8 + 9 + 8
	// Per support vector and task: index and coefficient, held twice while
	// the model is assembled (32).
	coefBytes = 32
)

// MemoryBytes returns an estimate of the peak memory, in bytes, that Fit
// with the options of s needs for nTrain training rows of d features in
// nClass classes, so that a planner can refuse a run before it starts. The
// matrix X itself (8·nTrain·d bytes, owned by the caller) is not included.
//
// The estimate is the sum of
//
//   - the kernel cache of the largest two-class task: min(CacheMiB, the
//     task's whole Gram matrix, 8m² bytes), taking m = nTrain (exact for two
//     classes, an upper bound for more, when the class sizes are unknown);
//   - that task's vectors: a copy of its points (8md) and 186 bytes per
//     row (indices, labels, norms, diagonal, permutation, multipliers,
//     gradients, flags, row headers);
//   - the model: every training row may be a support vector (8·nTrain·d for
//     their copy), with an index and a coefficient in each of the
//     nClass − 1 tasks it takes part in, plus about 49 bytes per row of
//     bookkeeping;
//
// doubled, because the Go runtime with its default GOGC = 100 lets the heap
// grow to twice the memory still in use before it collects (the caches and
// vectors of finished tasks and earlier fits are such garbage). Tasks run one
// after the other, so only one cache is alive at a time. Measured with
// /usr/bin/time -v (maximum resident set size of scripts/speed/svmfit on
// the blobs of BenchmarkSVMFit, default cache): one fit of 50,000 rows
// peaked at 230 MB in 2 classes and 273 MB in 10 (estimates 472 and 497
// MB); five fits of 40,000 rows in one process (5-fold cross-validation)
// at 413 and 451 MB (estimates 461 and 482 MB).
//
// It returns an error wrapping ErrParam for invalid options (as Fit) or
// negative sizes.
func (s *SVM) MemoryBytes(nTrain, d, nClass int) (int64, error) {
	if nTrain < 0 || d < 0 || nClass < 0 {
		return 0, fmt.Errorf("baselines: svm: memory estimate for %d rows, %d features, %d classes: %w", nTrain, d, nClass, ErrParam)
	}
	o, err := s.resolved(nTrain)
	if err != nil {
		return 0, err
	}
	n, dd := int64(nTrain), int64(d)
	m := n
	gram := 8 * m * m
	cache := 8 * int64(max(cacheFloats(o.CacheMiB), 2*nTrain))
	task := min(gram, cache) + m*(8*dd+taskBytesPerRow)
	model := n*(8*dd+fitBytesPerRow) + n*int64(max(nClass-1, 1))*coefBytes
	return 2 * (task + model), nil
}

// ErrMemory marks a fit whose estimated memory exceeds the caller's limit.
var ErrMemory = errors.New("estimated memory above the limit")

// CheckMemory returns an error wrapping ErrMemory when MemoryBytes(nTrain,
// d, nClass) exceeds limit bytes, naming the estimate, the limit and the
// two remedies (a smaller kernel cache, fewer rows), so that a planner can
// refuse a run before it starts; the planner adds the spec key. It returns
// MemoryBytes' errors for invalid input, and nil within the limit.
func (s *SVM) CheckMemory(nTrain, d, nClass int, limit int64) error {
	est, err := s.MemoryBytes(nTrain, d, nClass)
	if err != nil {
		return err
	}
	return memoryVerdict("svm", est, limit, nTrain, d, nClass, s.CacheMiB)
}

// CheckMemory is SVM.CheckMemory for the tuned model (TunedSVM.MemoryBytes).
func (m *TunedSVM) CheckMemory(nTrain, d, nClass int, limit int64) error {
	est, err := m.MemoryBytes(nTrain, d, nClass)
	if err != nil {
		return err
	}
	return memoryVerdict("tuned svm", est, limit, nTrain, d, nClass, m.SVM.CacheMiB)
}

func memoryVerdict(model string, est, limit int64, n, d, k int, cacheMiB float64) error {
	if est <= limit {
		return nil
	}
	if cacheMiB == 0 {
		cacheMiB = DefaultCacheMiB
	}
	const gib = 1 << 30
	return fmt.Errorf("baselines: %s: needs about %.2f GiB for %d training rows of %d features in %d classes, above the limit of %.2f GiB; lower the kernel cache (now %g MiB per two-class task) or use fewer rows: %w",
		model, float64(est)/gib, n, d, k, float64(limit)/gib, cacheMiB, ErrMemory)
}
