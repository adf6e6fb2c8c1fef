package results

import (
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
)

// valueTicks marks an axis at exactly the given values (the shot budgets
// or noise strengths of a sweep), each with its label. When neighbouring
// labels would collide at the drawn size, Figure.Render keeps every tick
// but labels only every s-th value from the first (see fitXTicks).
type valueTicks struct {
	vals   []float64 // ascending, distinct
	labels []string
}

// newValueTicks marks the distinct values of xs, labelled by tickLabel.
func newValueTicks(xs []float64) valueTicks {
	vals := slices.Clone(xs)
	slices.Sort(vals)
	vals = slices.Compact(vals)
	t := valueTicks{vals: vals, labels: make([]string, len(vals))}
	for i, v := range vals {
		t.labels[i] = tickLabel(v)
	}
	return t
}

// Ticks returns the values within [min, max], all labelled.
func (t valueTicks) Ticks(min, max float64) []plot.Tick {
	var out []plot.Tick
	for i, v := range t.vals {
		if v >= min && v <= max {
			out = append(out, plot.Tick{Value: v, Label: t.labels[i]})
		}
	}
	return out
}

// without returns a copy in which the labels of the values not kept are
// empty (gonum draws an unlabelled tick as a minor tick).
func (t valueTicks) without(keep []bool) valueTicks {
	u := valueTicks{vals: t.vals, labels: slices.Clone(t.labels)}
	for i := range u.labels {
		if !keep[i] {
			u.labels[i] = ""
		}
	}
	return u
}

// tickLabel writes a tick value: integers below a million in full
// (32, 2048), other values in at most four significant digits with a
// short exponent where one is needed (0.05, 1e-3 is written 0.001,
// 2.5e6).
func tickLabel(v float64) string {
	if v == math.Trunc(v) && math.Abs(v) < 1e6 {
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	s := strconv.FormatFloat(v, 'g', 4, 64)
	if i := strings.IndexByte(s, 'e'); i >= 0 {
		mant, exp := s[:i], s[i+1:]
		sign := ""
		if exp[0] == '-' {
			sign = "-"
		}
		exp = strings.TrimLeft(exp[1:], "0")
		s = mant + "e" + sign + exp
	}
	return s
}
