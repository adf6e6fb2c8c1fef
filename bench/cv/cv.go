package cv

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
)

var (
	// ErrTooFewPerClass marks a class with too few members for the split:
	// fewer than the folds (Stratified) or fewer than two (Holdout).
	ErrTooFewPerClass = errors.New("too few members in a class")
	// ErrFolds marks a fold count below 2 or above the number of instances.
	ErrFolds = errors.New("invalid number of folds")
	// ErrFraction marks a test fraction outside the open interval (0, 1).
	ErrFraction = errors.New("invalid test fraction")
	// ErrLabel marks a label outside [0, nClass).
	ErrLabel = errors.New("label out of range")
)

// Split is one training/test partition. Train and Test hold positions into
// the dataset's rows, each sorted ascending.
type Split struct {
	Repeat, Fold int
	Train, Test  []int
}

// ClassError reports a class with too few members for a split. It wraps
// ErrTooFewPerClass; the caller turns Class into a class name.
type ClassError struct {
	Class int // class index
	Count int // members of the class
	Need  int // members the split needs
}

func (e *ClassError) Error() string {
	return fmt.Sprintf("class %d has %d members, needs at least %d", e.Class, e.Count, e.Need)
}

// Unwrap returns ErrTooFewPerClass.
func (e *ClassError) Unwrap() error { return ErrTooFewPerClass }

// byClass returns the positions of each class's members, ascending, after
// checking the labels.
func byClass(y []int, nClass int) ([][]int, error) {
	if nClass < 1 {
		return nil, fmt.Errorf("%d classes: %w", nClass, ErrLabel)
	}
	members := make([][]int, nClass)
	for i, c := range y {
		if c < 0 || c >= nClass {
			return nil, fmt.Errorf("position %d: label %d not in [0, %d): %w", i, c, nClass, ErrLabel)
		}
		members[c] = append(members[c], i)
	}
	return members, nil
}

// Stratified returns k class-stratified folds of the positions 0..len(y)-1,
// in fold order, with Repeat 0. y holds class indices in [0, nClass).
//
// The members of each class, in class order, are shuffled with rng and dealt
// round robin into the folds; the fold pointer runs on from one class to the
// next. Hence fold f's test part holds floor(n_c/k) or ceil(n_c/k) members
// of every class c, and fold sizes differ by at most one. Classes without
// members are ignored; a class with 1..k-1 members is an error wrapping
// ErrTooFewPerClass (a *ClassError). k < 2 or k > len(y) is an error
// wrapping ErrFolds.
func Stratified(y []int, nClass, k int, rng *rand.Rand) ([]Split, error) {
	n := len(y)
	if k < 2 || k > n {
		return nil, fmt.Errorf("cv: stratified: %d folds for %d instances (need 2 <= folds <= instances): %w", k, n, ErrFolds)
	}
	members, err := byClass(y, nClass)
	if err != nil {
		return nil, fmt.Errorf("cv: stratified: %w", err)
	}
	for c, m := range members {
		if len(m) > 0 && len(m) < k {
			return nil, fmt.Errorf("cv: stratified, %d folds: %w", k, &ClassError{Class: c, Count: len(m), Need: k})
		}
	}
	fold := make([]int, n) // fold of each position
	next := 0
	for _, m := range members {
		if len(m) == 0 {
			continue
		}
		m = slices.Clone(m)
		rng.Shuffle(len(m), func(i, j int) { m[i], m[j] = m[j], m[i] })
		for _, pos := range m {
			fold[pos] = next
			next = (next + 1) % k
		}
	}
	splits := make([]Split, k)
	for f := range splits {
		splits[f].Fold = f
		size := n / k
		if f < n%k {
			size++
		}
		splits[f].Test = make([]int, 0, size)
		splits[f].Train = make([]int, 0, n-size)
	}
	// Ascending positions give ascending Test and Train.
	for pos, f := range fold {
		for g := range splits {
			if g == f {
				splits[g].Test = append(splits[g].Test, pos)
			} else {
				splits[g].Train = append(splits[g].Train, pos)
			}
		}
	}
	return splits, nil
}

// LeaveOneOut returns n folds; fold i tests position i and trains on all
// others. For n < 2 no split has both a training and a test instance, and it
// returns nil.
func LeaveOneOut(n int) []Split {
	if n < 2 {
		return nil
	}
	splits := make([]Split, n)
	for i := range splits {
		train := make([]int, 0, n-1)
		for j := range n {
			if j != i {
				train = append(train, j)
			}
		}
		splits[i] = Split{Fold: i, Train: train, Test: []int{i}}
	}
	return splits
}

// Holdout returns one stratified split of the positions 0..len(y)-1 with
// Repeat and Fold 0. Each class c with n_c >= 2 members puts
// round(testFrac * n_c) of them (math.Round: halves away from zero), clamped
// to [1, n_c - 1], chosen by a shuffle with rng, into Test and the rest into
// Train. Classes without members are ignored. A class with a single member
// is an error wrapping ErrTooFewPerClass (a *ClassError); testFrac outside
// (0, 1) wraps ErrFraction.
func Holdout(y []int, nClass int, testFrac float64, rng *rand.Rand) (Split, error) {
	if !(testFrac > 0 && testFrac < 1) {
		return Split{}, fmt.Errorf("cv: holdout: test fraction %v not in (0, 1): %w", testFrac, ErrFraction)
	}
	members, err := byClass(y, nClass)
	if err != nil {
		return Split{}, fmt.Errorf("cv: holdout: %w", err)
	}
	inTest := make([]bool, len(y))
	present := 0
	for c, m := range members {
		if len(m) == 0 {
			continue
		}
		present++
		if len(m) < 2 {
			return Split{}, fmt.Errorf("cv: holdout: %w", &ClassError{Class: c, Count: len(m), Need: 2})
		}
		t := int(math.Round(testFrac * float64(len(m))))
		t = min(max(t, 1), len(m)-1)
		m = slices.Clone(m)
		rng.Shuffle(len(m), func(i, j int) { m[i], m[j] = m[j], m[i] })
		for _, pos := range m[:t] {
			inTest[pos] = true
		}
	}
	if present == 0 {
		return Split{}, fmt.Errorf("cv: holdout: no instances: %w", ErrTooFewPerClass)
	}
	var sp Split
	for pos, te := range inTest {
		if te {
			sp.Test = append(sp.Test, pos)
		} else {
			sp.Train = append(sp.Train, pos)
		}
	}
	return sp, nil
}
