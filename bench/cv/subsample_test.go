package cv

import (
	"errors"
	"math"
	"slices"
	"testing"
)

// TestSubsampleCountsByHand checks the class counts against allocations
// derived by hand from the rule in the Subsampler comment (first one row
// per class, largest class first; then, among classes with c_k n < m n_k,
// the largest n_k/(c_k+1), ties to the lower class).
func TestSubsampleCountsByHand(t *testing.T) {
	tests := []struct {
		sizes []int   // n_k
		want  [][]int // counts for m = 1, 2, ..., n
	}{
		// Sizes 6, 3, 1 (n = 10). m = 1..3: one each, largest first.
		// m = 4: both eligible (10 < 24, 10 < 12), priorities 6/2 = 3 and
		// 3/2: class 0. m = 5: 6/3 = 2 > 1.5: class 0. m = 6: 6/4 = 1.5
		// ties 1.5: class 0. m = 7: 6/5 < 1.5: class 1. m = 8: 6/5 > 3/3:
		// class 0. m = 9: 6/6 ties 3/3 and class 0 is eligible (50 < 54):
		// class 0. m = 10: class 1.
		{[]int{6, 3, 1}, [][]int{{1, 0, 0}, {1, 1, 0}, {1, 1, 1}, {2, 1, 1}, {3, 1, 1}, {4, 1, 1}, {4, 2, 1}, {5, 2, 1}, {6, 2, 1}, {6, 3, 1}}},
		// Sizes 3, 3, 1 (the Alabama case of largest remainder, which
		// gives 1,1,1 then 2,2,0). Here: one each; m = 4: a tie at 3/2
		// (class 0); m = 5: 3/3 < 3/2 (class 1); m = 6: a tie at 3/3
		// (class 0).
		{[]int{3, 3, 1}, [][]int{{1, 0, 0}, {1, 1, 0}, {1, 1, 1}, {2, 1, 1}, {2, 2, 1}, {3, 2, 1}, {3, 3, 1}}},
		// Class 1 has no member: it never gets a row. Sizes 1 and 2 of
		// classes 0 and 2: the larger first.
		{[]int{1, 0, 2}, [][]int{{0, 0, 1}, {1, 0, 1}, {1, 0, 2}}},
		// Sizes 70, 20, 10 at m = 1..5: one each (largest first), then
		// class 0 twice (70/2 = 35 > 20/2; 70/3 > 20/2; both eligible:
		// 100 < 280, 200 < 350).
		{[]int{70, 20, 10}, [][]int{{1, 0, 0}, {1, 1, 0}, {1, 1, 1}, {2, 1, 1}, {3, 1, 1}}},
	}
	for _, tt := range tests {
		y := labels(tt.sizes...)
		s, err := NewSubsampler(allPositions(len(y)), y, len(tt.sizes), newRand(3))
		if err != nil {
			t.Fatal(err)
		}
		for m := 1; m <= len(tt.want); m++ {
			if got := s.Counts(m); !slices.Equal(got, tt.want[m-1]) {
				t.Errorf("sizes %v m %d: counts %v, want %v", tt.sizes, m, got, tt.want[m-1])
			}
			sub, err := s.Take(Size{Count: m})
			if err != nil {
				t.Fatal(err)
			}
			if got := countBy(sub, y, len(tt.sizes)); !slices.Equal(got, tt.want[m-1]) {
				t.Errorf("sizes %v m %d: subsample holds %v per class, want %v", tt.sizes, m, got, tt.want[m-1])
			}
		}
	}

	// Sizes 50 and 10: for m = 30 and 6 the quotas m n_k / n are whole
	// numbers (25, 5 and 5, 1), and the method keeps every count between
	// the floor and the ceiling of its quota, so the counts are the quotas
	// (derived by hand).
	y := labels(50, 10)
	s, err := NewSubsampler(allPositions(60), y, 2, newRand(4))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		size Size
		want []int
	}{
		{Size{Fraction: 0.5}, []int{25, 5}},
		{Size{Fraction: 0.1}, []int{5, 1}},
		{Size{Count: 30}, []int{25, 5}},
		{Size{Fraction: 1}, []int{50, 10}},
		// 0.025 * 60 = 1.5 rounds (half away from zero) to 2 rows: one
		// per class.
		{Size{Fraction: 0.025}, []int{1, 1}},
	} {
		m, err := s.Rows(c.size)
		if err != nil {
			t.Fatal(err)
		}
		if got := s.Counts(m); !slices.Equal(got, c.want) {
			t.Errorf("sizes 50,10, %v: counts %v, want %v", c.size, got, c.want)
		}
	}
}

// TestSubsampleNestedAndStratified checks, for many class layouts and
// seeds, the properties the Subsampler promises: every subsample is
// contained in the next larger one, holds the stated number of rows with
// Counts(m) from each class, has a row of every class present once m
// reaches the number of classes, never exceeds the ceiling of a class's
// quota m n_k / n, and reaches its floor whenever every present class has
// a quota of at least 1. (The quota method keeps both bounds when started
// from no rows, Balinski & Young 1975; with the one-row-per-class start
// the floor is checked here empirically, over 200 random layouts.)
func TestSubsampleNestedAndStratified(t *testing.T) {
	rng := newRand(11)
	lowDeficit := 0 // counts below the floor of the quota (at small m)
	for trial := range 200 {
		nClass := 2 + rng.IntN(4)
		sizes := make([]int, nClass)
		for c := range sizes {
			sizes[c] = rng.IntN(40) // may be 0: absent class
		}
		sizes[0] = max(sizes[0], 1)
		y := labels(sizes...)
		// A training part: a random half of the positions.
		var train []int
		for i := range y {
			if rng.IntN(2) == 0 {
				train = append(train, i)
			}
		}
		if len(train) == 0 {
			continue
		}
		n := len(train)
		present := 0
		inTrain := make([]int, nClass)
		for _, p := range train {
			inTrain[y[p]]++
		}
		for _, c := range inTrain {
			if c > 0 {
				present++
			}
		}
		s, err := NewSubsampler(train, y, nClass, newRand(uint64(trial)))
		if err != nil {
			t.Fatal(err)
		}
		var prev []int
		for m := 1; m <= n; m++ {
			sub, err := s.Take(Size{Count: m})
			if err != nil {
				t.Fatal(err)
			}
			if len(sub) != m || !slices.IsSorted(sub) {
				t.Fatalf("trial %d m %d: %d rows (sorted %v)", trial, m, len(sub), slices.IsSorted(sub))
			}
			for _, p := range prev {
				if _, found := slices.BinarySearch(sub, p); !found {
					t.Fatalf("trial %d: position %d in the subsample of %d rows but not in that of %d", trial, p, m-1, m)
				}
			}
			for _, p := range sub {
				if _, found := slices.BinarySearch(sortedCopy(train), p); !found {
					t.Fatalf("trial %d: position %d is not a training position", trial, p)
				}
			}
			counts := countBy(sub, y, nClass)
			if !slices.Equal(counts, s.Counts(m)) {
				t.Fatalf("trial %d m %d: counts %v, Counts says %v", trial, m, counts, s.Counts(m))
			}
			for c, k := range counts {
				if k > inTrain[c] {
					t.Fatalf("trial %d m %d: class %d has %d of %d", trial, m, c, k, inTrain[c])
				}
				if m >= present && inTrain[c] > 0 && k == 0 {
					t.Fatalf("trial %d m %d: class %d present but not drawn", trial, m, c)
				}
				// Quota bounds in exact integers: c n <= ceil(m n_k / n) n
				// means c < m n_k / n + 1, i.e. (c - 1) n < m n_k.
				if (k-1)*n >= m*inTrain[c] {
					t.Fatalf("trial %d m %d: class %d has %d rows, above the ceiling of its quota %d*%d/%d", trial, m, c, k, m, inTrain[c], n)
				}
				if (k+1)*n <= m*inTrain[c] {
					lowDeficit++
					if allQuotasAtLeastOne(m, n, inTrain) {
						t.Errorf("trial %d m %d: class %d has %d rows, below the floor of its quota %d*%d/%d", trial, m, c, k, m, inTrain[c], n)
					}
				}
			}
			prev = sub
		}
	}
	t.Logf("counts below the floor of their quota (one-row-per-class start, small m): %d", lowDeficit)
}

// TestSubsampleDeterminism: the same generator state gives the same
// subsamples; another seed gives other rows with the same counts; the
// one-call Subsample equals a Subsampler's Take.
func TestSubsampleDeterminism(t *testing.T) {
	y := labels(30, 20, 10)
	train := allPositions(len(y))
	a, _ := NewSubsampler(train, y, 3, newRand(5))
	b, _ := NewSubsampler(train, y, 3, newRand(5))
	c, _ := NewSubsampler(train, y, 3, newRand(6))
	for _, f := range []float64{0.1, 0.5, 0.9} {
		sa, _ := a.Take(Size{Fraction: f})
		sb, _ := b.Take(Size{Fraction: f})
		sc, _ := c.Take(Size{Fraction: f})
		if !slices.Equal(sa, sb) {
			t.Errorf("fraction %v: same seed, different subsamples", f)
		}
		if slices.Equal(sa, sc) {
			t.Errorf("fraction %v: seeds 5 and 6 gave the same rows", f)
		}
		if !slices.Equal(countBy(sa, y, 3), countBy(sc, y, 3)) {
			t.Errorf("fraction %v: counts depend on the seed", f)
		}
		one, err := Subsample(train, y, 3, Size{Fraction: f}, newRand(5))
		if err != nil || !slices.Equal(one, sa) {
			t.Errorf("fraction %v: Subsample differs from Take (%v)", f, err)
		}
	}
	// Taking sizes in any order from one Subsampler gives the same rows.
	big, _ := a.Take(Size{Count: 55})
	small, _ := a.Take(Size{Count: 7})
	fresh, _ := NewSubsampler(train, y, 3, newRand(5))
	small2, _ := fresh.Take(Size{Count: 7})
	if !slices.Equal(small, small2) || len(big) != 55 {
		t.Error("the order in which sizes are taken changes the rows")
	}
}

func TestSubsampleBadInput(t *testing.T) {
	y := labels(5, 5)
	train := allPositions(10)
	s, err := NewSubsampler(train, y, 2, newRand(1))
	if err != nil {
		t.Fatal(err)
	}
	for _, size := range []Size{
		{}, {Fraction: 0}, {Fraction: -0.1}, {Fraction: 1.5}, {Fraction: math.NaN()}, {Fraction: math.Inf(1)},
		{Count: -1}, {Count: 11}, {Count: 3, Fraction: 0.5},
		{Fraction: 0.04}, // 0.4 rows rounds to none
	} {
		if _, err := s.Take(size); !errors.Is(err, ErrSize) {
			t.Errorf("Take(%+v): %v, want ErrSize", size, err)
		}
	}
	for _, c := range []struct {
		train, y []int
		nClass   int
		want     error
	}{
		{nil, y, 2, ErrSize},
		{[]int{0, 1}, []int{0, 2}, 2, ErrLabel},
		{[]int{0}, []int{0}, 0, ErrLabel},
		{[]int{0, 0}, []int{0, 1}, 2, nil}, // repeated position: error without sentinel
		{[]int{5}, []int{0, 1}, 2, nil},    // position outside y
	} {
		_, err := NewSubsampler(c.train, c.y, c.nClass, newRand(1))
		if err == nil || c.want != nil && !errors.Is(err, c.want) {
			t.Errorf("NewSubsampler(%v, %v, %d): %v, want %v", c.train, c.y, c.nClass, err, c.want)
		}
	}
}

// allQuotasAtLeastOne reports whether m n_k / n >= 1 for every class
// present.
func allQuotasAtLeastOne(m, n int, counts []int) bool {
	for _, c := range counts {
		if c > 0 && m*c < n {
			return false
		}
	}
	return true
}

func allPositions(n int) []int {
	p := make([]int, n)
	for i := range p {
		p[i] = i
	}
	return p
}

func countBy(pos, y []int, nClass int) []int {
	c := make([]int, nClass)
	for _, p := range pos {
		c[y[p]]++
	}
	return c
}

func sortedCopy(s []int) []int {
	out := slices.Clone(s)
	slices.Sort(out)
	return out
}
