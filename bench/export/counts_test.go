package export

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/bench/plan"
	"fringe/bench/runner"
	"fringe/bench/spec"
	"fringe/qkernel/sim"
)

// loopSpec has a shot-mode interference model and a counts model with the
// same circuit settings; %s is the counts file, %s the circuit settings.
const loopSpec = `
name = "loop"
seed = 2024
pipelines = [%s]
[[dataset]]
name = "%s"
%s
[cv]
folds = 3
[[model]]
kind = "interference"
mode = "shots"
shots = 250
name = "shots"
%s
[[model]]
kind = "counts"
file = "measured.csv"
name = "device"
%s
`

// loopPlan plans loopSpec with its files resolved against dir.
func loopPlan(t *testing.T, dir, pipelines, dataset, classes, settings string) *plan.Plan {
	t.Helper()
	s, err := spec.Parse(filepath.Join(dir, "loop.toml"), []byte(fmt.Sprintf(loopSpec, pipelines, dataset, classes, settings, settings)))
	if err != nil {
		t.Fatal(err)
	}
	s.Dir = dir
	p, err := plan.New(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// measure plays the device: for every exported circuit it simulates the
// outcome distribution (state vector) and draws the shots as shot mode
// does (one multinomial sample over the accepted outcomes and one merged
// rejected outcome, from the row's stream), then spreads the rejected
// shots over the ancilla-1 outcomes with a generator of its own (a second
// multinomial, conditionally exact). It checks that each file of the
// export holds the circuit it was compiled from, and returns the counts
// file's text (with a pipeline column if withPipeline).
func measure(t *testing.T, p *plan.Plan, exportDir string, shots int, withPipeline bool) []byte {
	t.Helper()
	set, err := resolveExport(p, "")
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join(exportDir, "index.csv"))
	if err != nil {
		t.Fatal(err)
	}
	index, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	fileOf := map[string]string{}
	for _, r := range index[1:] {
		fileOf[strings.Join(r[1:6], "/")] = r[0]
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := append([]string(nil), modelkit.CountsColumns...)
	if withPipeline {
		head = append(head, "pipeline")
	}
	w.Write(head)
	aux := rand.New(rand.NewPCG(7, 7))
	n := 0
	for di, d := range p.Datasets {
		for pi := range p.Spec.Pipelines {
			for si := range d.Splits {
				err := exportUnit(p, di, pi, si, set, func(it exportItem) error {
					key := fmt.Sprintf("%s/%s/%d/%d/%d", it.Dataset, it.Pipeline, it.Repeat, it.Fold, it.Row)
					file, ok := fileOf[key]
					if !ok {
						return fmt.Errorf("index lacks %s", key)
					}
					text, err := os.ReadFile(filepath.Join(exportDir, file))
					if err != nil {
						return err
					}
					want, err := exportText(it, set)
					if err != nil {
						return err
					}
					if !bytes.Equal(text, want) {
						return fmt.Errorf("%s does not hold the circuit of %s", file, key)
					}
					dist, err := sim.Outcomes(it.Circuit, sim.Options{})
					if err != nil {
						return err
					}
					rng, err := it.qk.RowRand(it.Pos)
					if err != nil {
						return err
					}
					h := len(dist) / 2
					agg := make([]float64, h+1)
					copy(agg, dist[:h])
					for _, v := range dist[h:] {
						agg[h] += v
					}
					acc := sim.SampleCounts(agg, shots, rng)
					rej := make([]int, h)
					if acc[h] > 0 {
						rej = sim.SampleCounts(dist[h:], acc[h], aux)
					}
					q := len(it.Circuit.Regs.Class)
					for a, cs := range [][]int{acc[:h], rej} {
						for k, c := range cs {
							if c == 0 && (k+a)%2 == 1 {
								continue // leave some zero outcomes out, as a device does
							}
							rec := []string{it.Dataset, strconv.Itoa(it.Repeat), strconv.Itoa(it.Fold), strconv.Itoa(it.Row),
								strconv.Itoa(a), modelkit.FormatBits(k, q), strconv.Itoa(c)}
							if withPipeline {
								rec = append(rec, it.Pipeline)
							}
							w.Write(rec)
						}
					}
					n++
					return nil
				})
				if err != nil {
					t.Fatal(err)
				}
			}
		}
	}
	if n != len(index)-1 {
		t.Fatalf("measured %d instances, the index lists %d", n, len(index)-1)
	}
	w.Flush()
	return b.Bytes()
}

// TestCountsClosesLoop exports the circuits of a spec, measures them with
// fringe's own simulator and shot sampler (measure), imports the counts
// with a counts model and compares with the shot-mode model of the same
// spec and seed: the same predictions, p_acc, accepted shots, class
// probabilities and exact-mode decisions for every test instance.
func TestCountsClosesLoop(t *testing.T) {
	for _, c := range []struct {
		name, pipelines, dataset, classes, settings string
	}{
		{"iris-sv", `"std"`, "iris", `classes = ["setosa", "versicolor"]`, ""},
		{"wine-subset", `"std", "minmax"`, "wine", "", "balance = true\ntrain_subset = 8"},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			p := loopPlan(t, dir, c.pipelines, c.dataset, c.classes, c.settings)
			export := filepath.Join(dir, "circuits")
			if _, err := Circuits(context.Background(), p, export, Options{Workers: 2}); err != nil {
				t.Fatal(err)
			}
			counts := measure(t, p, export, 250, len(p.Spec.Pipelines) > 1)
			if err := os.WriteFile(filepath.Join(dir, "measured.csv"), counts, 0o644); err != nil {
				t.Fatal(err)
			}
			res, err := runner.Execute(context.Background(), p, runner.Options{Workers: 2})
			if err != nil {
				t.Fatal(err)
			}
			preds, folds, _ := runner.Records(p, res)
			type inst struct {
				pipe              string
				repeat, fold, row int
			}
			shots := map[inst]int{}
			for i, pr := range preds {
				if pr.Model == "shots" {
					shots[inst{pr.Pipeline, pr.Repeat, pr.Fold, pr.Row}] = i
				}
			}
			compared, differ := 0, 0
			for _, pr := range preds {
				if pr.Model != "device" {
					continue
				}
				j, ok := shots[inst{pr.Pipeline, pr.Repeat, pr.Fold, pr.Row}]
				if !ok {
					t.Fatalf("no shot-mode record for %+v", pr)
				}
				sh := preds[j]
				compared++
				if pr.Predicted != sh.Predicted || pr.Shots != sh.Shots || pr.Exact != sh.Exact {
					t.Errorf("%s r%d f%d row %d: counts predict %s (%d shots, exact %s), shot mode %s (%d, %s)",
						pr.Pipeline, pr.Repeat, pr.Fold, pr.Row, pr.Predicted, pr.Shots, pr.Exact, sh.Predicted, sh.Shots, sh.Exact)
				}
				if pr.Predicted != pr.Exact {
					differ++
				}
				// The same ratios of the same integers: identical.
				if !scalar.EqualWithinAbsOrRel(pr.PAcc, sh.PAcc, 0, 0) {
					t.Errorf("row %d: p_acc %.17g, shot mode %.17g", pr.Row, pr.PAcc, sh.PAcc)
				}
				for k := range sh.Probs {
					if !scalar.EqualWithinAbsOrRel(pr.Probs[k], sh.Probs[k], 0, 0) {
						t.Errorf("row %d class %d: P %.17g, shot mode %.17g", pr.Row, k, pr.Probs[k], sh.Probs[k])
					}
				}
			}
			want := p.Datasets[0].Data.Len() * len(p.Spec.Pipelines)
			if compared != want {
				t.Errorf("compared %d instances, want %d", compared, want)
			}
			for _, f := range folds {
				if f.Model == "device" && (math.IsNaN(f.MeanPAcc) || math.IsNaN(f.MeanShots) || math.IsNaN(f.ExactDisagreement)) {
					t.Errorf("fold %+v: counts model lacks mean p_acc, shots or exact disagreement", f)
				}
			}
			t.Logf("%d instances identical to shot mode; %d decisions differ from exact mode", compared, differ)
		})
	}
}

// validCounts writes a small well-formed counts file for every test
// instance of the plan (the counts are arbitrary but valid).
func validCounts(p *plan.Plan, withPipeline bool) string {
	var b strings.Builder
	b.WriteString(strings.Join(modelkit.CountsColumns, ","))
	if withPipeline {
		b.WriteString(",pipeline")
	}
	b.WriteString("\n")
	pipes := []string{""}
	if withPipeline {
		pipes = p.Spec.Pipelines
	}
	for _, d := range p.Datasets {
		for _, ps := range pipes {
			for _, sp := range d.Splits {
				for _, j := range sp.Test {
					row := d.Data.Rows[j]
					for _, o := range []string{"0,0,5", "0,1,3", "1,1,2"} {
						fmt.Fprintf(&b, "%s,%d,%d,%d,%s", d.Name, sp.Repeat, sp.Fold, row, o)
						if withPipeline {
							b.WriteString("," + ps)
						}
						b.WriteString("\n")
					}
				}
			}
		}
	}
	return b.String()
}

// TestCountsBadInput checks that a counts file that does not match the
// spec fails the run as bad input, naming the file, the line where there
// is one, and the problem.
func TestCountsBadInput(t *testing.T) {
	dir := t.TempDir()
	p := loopPlan(t, dir, `"std"`, "iris", `classes = ["setosa", "versicolor"]`, "")
	good := validCounts(p, false)
	lines := strings.Split(strings.TrimSuffix(good, "\n"), "\n")
	// lines[1..3] are the three outcomes of the first test instance.
	first := strings.Split(lines[1], ",")
	sp0 := p.Datasets[0].Splits[0]
	trainRow := p.Datasets[0].Data.Rows[sp0.Train[0]]
	replace := func(i int, s string) string {
		l := append([]string(nil), lines...)
		l[i] = s
		return strings.Join(l, "\n") + "\n"
	}
	drop := func(from, to int) string {
		l := append(append([]string(nil), lines[:from]...), lines[to:]...)
		return strings.Join(l, "\n") + "\n"
	}
	with := func(i, col int, v string) string {
		f := strings.Split(lines[i], ",")
		f[col] = v
		return replace(i, strings.Join(f, ","))
	}
	zero := append([]string(nil), lines...)
	for j := 1; j <= 3; j++ { // every outcome of the first instance
		f := strings.Split(zero[j], ",")
		f[6] = "0"
		zero[j] = strings.Join(f, ",")
	}
	allZero := strings.Join(zero, "\n") + "\n"
	cases := []struct {
		name, text string
		want       []string
	}{
		{"no file", "", []string{"measured.csv", "no such file"}},
		{"empty", "", []string{"measured.csv", "empty counts file"}},
		{"wrong header", replace(0, "dataset,repeat,fold,row,ancilla,class,shots"), []string{"measured.csv:1", `unexpected column "shots"`}},
		{"missing column", replace(0, "dataset,repeat,fold,row,ancilla,class"), []string{"measured.csv:1", "lacks column(s) count"}},
		{"missing instance", drop(1, 4), []string{"measured.csv", "no counts for dataset iris, repeat 0, fold " + first[2] + ", row " + first[3]}},
		{"extra instance", lines[0] + "\n" + good[len(lines[0])+1:] + fmt.Sprintf("iris,0,0,%d,0,0,4\n", trainRow), []string{"measured.csv:", fmt.Sprintf("row %d of dataset iris is a test instance of repeat 0 fold", trainRow)}},
		{"wrong fold", with(1, 2, strconv.Itoa((mustAtoi(first[2])+1)%3)), []string{"measured.csv:2", "not fold"}},
		{"unknown dataset", with(1, 0, "irises"), []string{"measured.csv:2", `"irises" is not a dataset of the spec`}},
		{"unknown row", with(1, 3, "140"), []string{"measured.csv:2", "has no row 140"}},
		{"no such repeat", with(1, 1, "4"), []string{"measured.csv:2", "no repeat 4 fold"}},
		{"ancilla 2", with(1, 4, "2"), []string{"measured.csv:2", "ancilla", `"2"`}},
		{"class too long", with(1, 5, "01"), []string{"measured.csv:2", `"01" is not a 1-bit string`}},
		{"class not bits", with(1, 5, "a"), []string{"measured.csv:2", `"a" is not a 1-bit string`}},
		{"negative count", with(1, 6, "-3"), []string{"measured.csv:2", "count", "not a non-negative integer"}},
		{"fractional count", with(1, 6, "2.5"), []string{"measured.csv:2", "count"}},
		{"duplicate outcome", replace(2, lines[1]), []string{"measured.csv:3", "also on line 2"}},
		{"all zero", allZero, []string{"measured.csv", "every count is zero"}},
		{"ragged", replace(2, "iris,0,1"), []string{"measured.csv:3", "3 fields"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(dir, "measured.csv")
			os.Remove(path)
			if c.name != "no file" {
				if err := os.WriteFile(path, []byte(c.text), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			p := loopPlan(t, dir, `"std"`, "iris", `classes = ["setosa", "versicolor"]`, "")
			_, err := runner.Execute(context.Background(), p, runner.Options{Workers: 2})
			if err == nil {
				t.Fatal("run succeeded")
			}
			if !errors.Is(err, input.ErrBad) {
				t.Errorf("not an input error: %v", err)
			}
			msg := err.Error()
			for _, w := range append([]string{"model device"}, c.want...) {
				if !strings.Contains(msg, w) {
					t.Errorf("message lacks %q:\n%s", w, msg)
				}
			}
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans several lines:\n%s", msg)
			}
		})
	}

	// The well-formed file runs, and several pipelines need a pipeline column.
	if err := os.WriteFile(filepath.Join(dir, "measured.csv"), []byte(good), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := runner.Execute(context.Background(), p, runner.Options{Workers: 2}); err != nil {
		t.Fatalf("valid counts file: %v", err)
	}
	p2 := loopPlan(t, dir, `"std", "l2"`, "iris", `classes = ["setosa", "versicolor"]`, "")
	_, err := runner.Execute(context.Background(), p2, runner.Options{Workers: 2})
	if err == nil || !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), "measured.csv:1") || !strings.Contains(err.Error(), "add a pipeline column") {
		t.Errorf("two pipelines, no pipeline column: %v", err)
	}
	if err := os.WriteFile(filepath.Join(dir, "measured.csv"), []byte(validCounts(p2, true)), 0o644); err != nil {
		t.Fatal(err)
	}
	// A counts file is read once per plan: plan again after changing it.
	p2 = loopPlan(t, dir, `"std", "l2"`, "iris", `classes = ["setosa", "versicolor"]`, "")
	if _, err := runner.Execute(context.Background(), p2, runner.Options{Workers: 2}); err != nil {
		t.Fatalf("two pipelines with a pipeline column: %v", err)
	}
}

func mustAtoi(s string) int {
	v, err := strconv.Atoi(s)
	if err != nil {
		panic(err)
	}
	return v
}
