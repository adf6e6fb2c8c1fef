package results

import (
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
)

func TestTickLabel(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{32, "32"}, {2048, "2048"}, {999999, "999999"}, {1e6, "1e6"}, {2.5e6, "2.5e6"}, {1048576, "1.049e6"},
		{0.1, "0.1"}, {0.05, "0.05"}, {0.001, "0.001"}, {1e-5, "1e-5"}, {0.30000000000000004, "0.3"}, {0, "0"},
	} {
		if got := tickLabel(c.v); got != c.want {
			t.Errorf("tickLabel(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}

// sweepTicks draws a one-line shot sweep over budgets at the bench's
// size and returns its x ticks (from the plot's ticker) and, for each,
// whether its label was drawn (from a recorder).
func sweepTicks(t *testing.T, budgets []float64) (vals []float64, drawn []bool) {
	t.Helper()
	n := len(budgets)
	l := SweepLine{Label: "iris", X: budgets, Mean: make([]float64, n), Lo: make([]float64, n), Hi: make([]float64, n), Exact: math.NaN(), Baseline: math.NaN()}
	for i := range l.Mean {
		l.Mean[i], l.Lo[i], l.Hi[i] = 0.8, 0.7, 0.9
	}
	p, err := SweepPlot(Sweep{Title: "shots", XLabel: "shots per test instance", YLabel: "accuracy", LogX: true, Lines: []SweepLine{l}})
	if err != nil {
		t.Fatal(err)
	}
	f := Figure{Plot: p, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true}
	texts := joined(layoutOf(f))
	for _, tk := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		vals = append(vals, tk.Value)
		drawn = append(drawn, strings.Contains("\n"+texts, "\n"+tickLabel(tk.Value)+"\n"))
	}
	return vals, drawn
}

// TestSweepTicks checks that a log shot axis has a tick at every budget
// used and nowhere else, each labelled when they fit, and that when they
// do not, every s-th is labelled from the first.
func TestSweepTicks(t *testing.T) {
	budgets := []float64{32, 128, 512, 2048}
	vals, drawn := sweepTicks(t, budgets)
	if !slices.Equal(vals, budgets) || !slices.Equal(drawn, []bool{true, true, true, true}) {
		t.Errorf("budgets %v: ticks %v, labels drawn %v", budgets, vals, drawn)
	}
	var dense []float64
	for e := 3; e <= 20; e++ {
		dense = append(dense, math.Pow(2, float64(e)))
	}
	vals, drawn = sweepTicks(t, dense)
	if !slices.Equal(vals, dense) {
		t.Errorf("ticks %v, want %v", vals, dense)
	}
	stride := slices.Index(drawn[1:], true) + 1
	if !drawn[0] || stride < 2 {
		t.Fatalf("18 budgets ×2 apart: labels drawn %v, want the first and a stride of 2 or more", drawn)
	}
	for i, d := range drawn {
		if want := i%stride == 0; d != want {
			t.Errorf("label of %v drawn %v, want labels every %d-th", vals[i], d, stride)
		}
	}
}

// TestCDTicks checks that the critical-difference diagram labels every
// integer rank at CDWidth for up to 14 models with long names (they ran
// together before) and every 2nd or more at a narrow width.
func TestCDTicks(t *testing.T) {
	for k := 2; k <= 14; k++ {
		ranks := make([]float64, k)
		for i := range ranks {
			ranks[i] = float64(i + 1)
		}
		tab := RankTable{Models: modelNames(k, true), AvgRanks: ranks, CD: 1.5, Alpha: 0.05}
		g := cdLayout(tab, tab.Groups(), CDWidth-2*figMargin)
		if g.step != 1 {
			t.Errorf("k = %d: tick labels every %d ranks, want every rank", k, g.step)
		}
		if k == 14 {
			if g := cdLayout(tab, tab.Groups(), 150); g.step < 2 {
				t.Errorf("k = 14 at 150 pt: tick labels every %d ranks, want 2 or more", g.step)
			}
		}
	}
}

func TestDecadeTicksRanges(t *testing.T) {
	labelled := func(ts []plot.Tick) (out []string) {
		for _, tk := range ts {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return out
	}
	for _, c := range []struct {
		min, max float64
		want     []string
	}{
		{1, 10000, []string{"1", "10", "100", "1000", "10000"}},
		// The first decade in the range is labelled (5 is not a decade).
		{5, 2e12, []string{"10", "1000", "1e5", "1e7", "1e9", "1e11"}},
		{1e-6, 0.1, []string{"1e-6", "1e-5", "1e-4", "1e-3", "0.01", "0.1"}},
		// No power of ten inside: 1, 2, 3, 5 times one.
		{20, 45, []string{"20", "30"}},
		{0.25, 0.6, []string{"0.3", "0.5"}},
	} {
		if got := labelled(decadeTicks{}.Ticks(c.min, c.max)); !slices.Equal(got, c.want) {
			t.Errorf("decadeTicks [%v, %v]: labels %q, want %q", c.min, c.max, got, c.want)
		}
	}
}
