package cv

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
)

// ErrSize marks a subsample size that is neither a fraction in (0, 1] nor
// a count in [1, n], or that gives no row.
var ErrSize = errors.New("invalid subsample size")

// Size is the size of a subsample of a training part of n rows: Count
// rows, or, when Count is 0, the fraction Fraction of them, rounded to
// the nearest whole number (halves away from zero). Exactly one of the two
// must be set.
type Size struct {
	Fraction float64 // in (0, 1]; used when Count is 0
	Count    int     // in [1, n]
}

func (s Size) String() string {
	if s.Count != 0 {
		return fmt.Sprintf("%d rows", s.Count)
	}
	return fmt.Sprintf("fraction %v", s.Fraction)
}

// Subsampler draws class-stratified subsamples of one training part for
// learning curves. The subsamples of every size are nested: for the same
// training part, labels and generator state, a smaller subsample is
// contained in every larger one.
//
// Class counts. For a subsample of m rows out of n, class k (n_k rows in
// the training part) gets c_k(m) rows, built one row at a time: while some
// class present in the training part has no row, the next row goes to the
// largest such class (ties to the lower class index); after that it goes,
// among the classes whose count is below the upper quota, c_k < m n_k / n
// (so c_k stays at most ceil(m n_k / n)), to the one with the largest
// priority n_k / (c_k + 1), ties to the lower class index. Past the
// one-row-per-class start this is the quota method of M. L. Balinski & H.
// P. Young (American Mathematical Monthly 82:701-730, 1975; recalled from
// memory), which keeps every count between the floor and the ceiling of
// its quota m n_k / n and never decreases a count as m grows. The
// one-row-per-class start can hold a large class below the floor of its
// quota while m is small (3 classes of 70, 20 and 10 rows give 1, 1, 1 at
// m = 3); the ceiling holds for every m, and in the tests every count
// reaches its floor once all quotas are at least 1. Largest-remainder rounding is not
// monotone (the Alabama paradox): class sizes 3, 3, 1 get 1, 1, 1 rows for
// m = 3 but 2, 2, 0 for m = 4, so nested subsamples could not follow it.
// All comparisons are exact integer arithmetic.
//
// Draws. NewSubsampler shuffles the training positions of each class once,
// in class order, with rng (one rand.Rand.Shuffle per class present); a
// subsample takes the first c_k(m) positions of class k's order. Nesting
// follows from the counts never decreasing. The generator is read only in
// NewSubsampler, so every size taken from one Subsampler is nested.
type Subsampler struct {
	order [][]int // per class, its training positions in shuffled order
	count []int   // n_k
	n     int
	seq   []int // class of the t-th row of the allocation, grown on demand
	seats []int // counts after len(seq) rows
}

// NewSubsampler prepares subsamples of the training positions train,
// whose labels are y[pos] (class indices in [0, nClass)), drawing the
// per-class orders from rng. Positions must be distinct and index y.
func NewSubsampler(train, y []int, nClass int, rng *rand.Rand) (*Subsampler, error) {
	if nClass < 1 {
		return nil, fmt.Errorf("cv: subsample: %d classes: %w", nClass, ErrLabel)
	}
	if len(train) == 0 {
		return nil, fmt.Errorf("cv: subsample: no training rows: %w", ErrSize)
	}
	if uint64(len(train)) >= 1<<32 {
		return nil, fmt.Errorf("cv: subsample: %d training rows, at most 2^32-1: %w", len(train), ErrSize)
	}
	seen := make(map[int]bool, len(train))
	members := make([][]int, nClass)
	for _, pos := range train {
		if pos < 0 || pos >= len(y) {
			return nil, fmt.Errorf("cv: subsample: position %d outside the %d labels", pos, len(y))
		}
		if seen[pos] {
			return nil, fmt.Errorf("cv: subsample: position %d given twice", pos)
		}
		seen[pos] = true
		c := y[pos]
		if c < 0 || c >= nClass {
			return nil, fmt.Errorf("cv: subsample: position %d: label %d not in [0, %d): %w", pos, c, nClass, ErrLabel)
		}
		members[c] = append(members[c], pos)
	}
	s := &Subsampler{order: members, count: make([]int, nClass), n: len(train), seats: make([]int, nClass)}
	for c, m := range members {
		slices.Sort(m)
		rng.Shuffle(len(m), func(i, j int) { m[i], m[j] = m[j], m[i] })
		s.count[c] = len(m)
	}
	return s, nil
}

// Len returns the number of training rows n.
func (s *Subsampler) Len() int { return s.n }

// Rows returns the number of rows m of a subsample of the given size, or
// an error wrapping ErrSize.
func (s *Subsampler) Rows(size Size) (int, error) {
	switch {
	case size.Count != 0 && size.Fraction != 0:
		return 0, fmt.Errorf("cv: subsample: both a count (%d) and a fraction (%v) given: %w", size.Count, size.Fraction, ErrSize)
	case size.Count != 0:
		if size.Count < 1 || size.Count > s.n {
			return 0, fmt.Errorf("cv: subsample: %d rows asked for, the training part has %d: %w", size.Count, s.n, ErrSize)
		}
		return size.Count, nil
	case !(size.Fraction > 0 && size.Fraction <= 1):
		return 0, fmt.Errorf("cv: subsample: fraction %v not in (0, 1]: %w", size.Fraction, ErrSize)
	}
	m := int(math.Round(size.Fraction * float64(s.n)))
	if m < 1 {
		return 0, fmt.Errorf("cv: subsample: fraction %v of %d rows rounds to no row: %w", size.Fraction, s.n, ErrSize)
	}
	return min(m, s.n), nil
}

// Counts returns the rows per class of a subsample of m rows (0 <= m <=
// n; m is clamped to that range), in class order.
func (s *Subsampler) Counts(m int) []int {
	m = min(max(m, 0), s.n)
	s.grow(m)
	out := make([]int, len(s.count))
	for _, c := range s.seq[:m] {
		out[c]++
	}
	return out
}

// grow extends the allocation sequence to m rows.
func (s *Subsampler) grow(m int) {
	for len(s.seq) < m {
		next := uint64(len(s.seq) + 1) // rows after this one
		best := -1
		start := false // some present class has no row yet
		for c, nc := range s.count {
			if nc > 0 && s.seats[c] == 0 {
				start = true
			}
		}
		for c, nc := range s.count {
			sc := s.seats[c]
			switch {
			case sc >= nc: // full, or absent
				continue
			case start:
				if sc > 0 {
					continue
				}
			case uint64(sc)*uint64(s.n) >= next*uint64(nc):
				continue // at its upper quota
			}
			if best < 0 || s.before(c, best, start) {
				best = c
			}
		}
		s.seq = append(s.seq, best)
		s.seats[best]++
	}
}

// before reports whether class a takes the next row ahead of class b:
// during the one-row-per-class start the larger class, afterwards the
// larger n_k / (c_k + 1) (cross-multiplied, exact: n < 2^32); ties go to
// the lower class index.
func (s *Subsampler) before(a, b int, start bool) bool {
	na, nb := uint64(s.count[a]), uint64(s.count[b])
	pa, pb := na, nb
	if !start {
		pa, pb = na*uint64(s.seats[b]+1), nb*uint64(s.seats[a]+1)
	}
	return pa > pb || pa == pb && a < b
}

// Take returns the subsample of the given size: training positions,
// ascending, with Counts(m) of them from each class.
func (s *Subsampler) Take(size Size) ([]int, error) {
	m, err := s.Rows(size)
	if err != nil {
		return nil, err
	}
	out := make([]int, 0, m)
	for c, k := range s.Counts(m) {
		out = append(out, s.order[c][:k]...)
	}
	slices.Sort(out)
	return out, nil
}

// Subsample returns one class-stratified subsample of the training
// positions train (see Subsampler for the counts, the draws and nesting):
// NewSubsampler(train, y, nClass, rng) followed by Take(size).
func Subsample(train, y []int, nClass int, size Size, rng *rand.Rand) ([]int, error) {
	s, err := NewSubsampler(train, y, nClass, rng)
	if err != nil {
		return nil, err
	}
	return s.Take(size)
}
