package export

import (
	"fmt"
	"sort"

	"fringe/bench/input"
	"fringe/bench/plan"
	"fringe/bench/spec"
	"fringe/datasets"
	"fringe/qkernel/circuit"
)

// CircuitRequest asks for the compiled interference circuit of one test
// instance of a dataset.
type CircuitRequest struct {
	Dataset  spec.Dataset
	Pipeline string
	Train    int  // training-set size; 0 = every row but the test instance
	Balance  bool // class-balancing index weights 1/(C * M_k)
	Row      int  // dataset row (0-based, as loaded) of the test instance
	Seed     uint64
}

// CircuitResult is a compiled circuit with what it was built from.
type CircuitResult struct {
	Circuit   *circuit.Circuit
	Dataset   *datasets.Dataset
	TrainRows []int // dataset rows of the training instances, ascending
	TestRow   int
	Features  int // features after the pipeline (before padding)
}

// BuildCircuit loads the dataset, picks the training set (every other row,
// or a class-balanced random subset of Train rows drawn with a generator
// derived from plan.Seed), fits the pipeline on the training rows only, and
// compiles the circuit for the test row. Errors are input errors.
func BuildCircuit(req CircuitRequest) (*CircuitResult, error) {
	base := &spec.Spec{File: "", Seed: req.Seed}
	data, err := plan.LoadDataset(base, req.Dataset)
	if err != nil {
		return nil, err
	}
	bad := func(format string, args ...any) error {
		return &input.Error{Err: fmt.Errorf(format, args...)}
	}
	pos := -1
	for i, r := range data.Rows {
		if r == req.Row {
			pos = i
			break
		}
	}
	if pos < 0 {
		return nil, bad("dataset %s has no row %d (rows are 0-based, %d rows after selection)", req.Dataset.Display(), req.Row, data.Len())
	}
	var others []int
	for i := 0; i < data.Len(); i++ {
		if i != pos {
			others = append(others, i)
		}
	}
	train := others
	if req.Train > 0 && req.Train < len(others) {
		rng := plan.NewRand(req.Seed, "circuit", req.Dataset.Display(), fmt.Sprint(req.Row))
		train = BalancedSubset(data.Y, others, len(data.Classes), req.Train, rng.IntN)
	} else if req.Train > len(others) {
		return nil, bad("training-set size %d exceeds the %d other rows of dataset %s", req.Train, len(others), req.Dataset.Display())
	}
	pipe, err := datasets.ParsePipeline(req.Pipeline)
	if err != nil {
		return nil, &input.Error{Key: "pipeline", Err: err}
	}
	Xtr, ytr, rowsTr := plan.Gather(data, train)
	Xte, _, rowsTe := plan.Gather(data, []int{pos})
	Ztr, err := pipe.FitTransform(Xtr, rowsTr)
	if err != nil {
		return nil, &input.Error{Err: fmt.Errorf("dataset %s, pipeline %s: %w", req.Dataset.Display(), req.Pipeline, err)}
	}
	Zte, err := pipe.Transform(Xte, rowsTe)
	if err != nil {
		return nil, &input.Error{Err: fmt.Errorf("dataset %s, pipeline %s: %w", req.Dataset.Display(), req.Pipeline, err)}
	}
	rows := make([][]float64, len(train))
	for i := range rows {
		rows[i] = Ztr.RawRowView(i)
	}
	var w []float64
	if req.Balance {
		w, err = circuit.BalancedWeights(ytr, len(data.Classes))
		if err != nil {
			return nil, &input.Error{Err: err}
		}
	}
	c, err := circuit.Compile(Zte.RawRowView(0), rows, ytr, len(data.Classes), w)
	if err != nil {
		return nil, &input.Error{Err: fmt.Errorf("dataset %s row %d: %w", req.Dataset.Display(), req.Row, err)}
	}
	sort.Ints(rowsTr)
	_, f := Ztr.Dims()
	return &CircuitResult{Circuit: c, Dataset: data, TrainRows: rowsTr, TestRow: req.Row, Features: f}, nil
}

// BalancedSubset draws k of the positions idx, as equal as possible per
// class (remainders to classes in class order, capped by class size and
// redistributed), without replacement, using intn for randomness; the
// result is sorted.
func BalancedSubset(y, idx []int, nClass, k int, intn func(int) int) []int {
	byClass := make([][]int, nClass)
	for _, i := range idx {
		byClass[y[i]] = append(byClass[y[i]], i)
	}
	quota := make([]int, nClass)
	left := k
	for left > 0 {
		open := 0
		for c := range byClass {
			if quota[c] < len(byClass[c]) {
				open++
			}
		}
		if open == 0 {
			break
		}
		share := left / open
		if share == 0 {
			share = 1
		}
		for c := range byClass {
			if left == 0 {
				break
			}
			if room := len(byClass[c]) - quota[c]; room > 0 {
				n := min(share, room, left)
				quota[c] += n
				left -= n
			}
		}
	}
	var out []int
	for c, members := range byClass {
		m := append([]int(nil), members...)
		for i := 0; i < quota[c]; i++ { // partial Fisher–Yates
			j := i + intn(len(m)-i)
			m[i], m[j] = m[j], m[i]
		}
		out = append(out, m[:quota[c]]...)
	}
	sort.Ints(out)
	return out
}
