package report

import (
	"errors"
	"slices"
	"strings"
	"testing"

	"fringe/bench/input"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestReadScoresAndRank(t *testing.T) {
	// Three models on three datasets, columns in another order, an extra
	// column and a comment. Ranks derived by hand: a is best on x and y,
	// c on z; b and c tie on x (2.5 each).
	text := "# invented scores\nmodel,note,score,dataset\na,,0.9,x\nb,,0.8,x\nc,,0.8,x\na,,0.7,y\nb,,0.6,y\nc,,0.5,y\na,,0.2,z\nb,,0.3,z\nc,,0.4,z\n"
	st, err := ReadScores(strings.NewReader(text), "s.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(st.Datasets, []string{"x", "y", "z"}) || !slices.Equal(st.Models, []string{"a", "b", "c"}) {
		t.Fatalf("table %+v", st)
	}
	rt, err := Rank(st, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	// a: 1, 1, 3 → 5/3; b: 2.5, 2, 2 → 6.5/3; c: 2.5, 3, 1 → 6.5/3.
	for j, want := range []float64{5.0 / 3, 6.5 / 3, 6.5 / 3} {
		if !scalar.EqualWithinAbsOrRel(rt.AvgRanks[j], want, 1e-12, 1e-12) { // means of halves: rounding only
			t.Errorf("rank of %s = %v, want %v", rt.Models[j], rt.AvgRanks[j], want)
		}
	}
}

func TestReadScoresErrors(t *testing.T) {
	for _, c := range []struct {
		name, text string
		line       int
		want       string
	}{
		{"empty", "", 0, "empty file"},
		{"no score column", "dataset,model,value\nx,a,1\n", 1, `missing column "score"`},
		{"not a number", "dataset,model,score\nx,a,0.5\nx,b,high\n", 3, `want a finite number, got "high"`},
		{"nan", "dataset,model,score\nx,a,NaN\n", 2, "finite"},
		{"ragged", "dataset,model,score\nx,a,0.5,9\n", 2, "4 fields"},
		{"duplicate", "dataset,model,score\nx,a,1\nx,b,2\ny,a,1\ny,b,2\nx,a,3\n", 6, "first on line 2"},
		{"missing pair", "dataset,model,score\nx,a,1\nx,b,2\ny,a,1\n", 0, `dataset "y" has no score for model "b"`},
		{"one model", "dataset,model,score\nx,a,1\ny,a,2\n", 0, "at least two"},
		{"empty name", "dataset,model,score\n,a,1\n", 2, "empty dataset name"},
	} {
		_, err := ReadScores(strings.NewReader(c.text), "scores.csv")
		var ie *input.Error
		if !errors.As(err, &ie) || !errors.Is(err, input.ErrBad) {
			t.Errorf("%s: error %v is not an input error", c.name, err)
			continue
		}
		if ie.File != "scores.csv" || ie.Line != c.line || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %q (line %d), want line %d and %q", c.name, err, ie.Line, c.line, c.want)
		}
	}
}
