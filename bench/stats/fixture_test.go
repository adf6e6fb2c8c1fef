package stats

import (
	"encoding/json"
	"math"
	"os"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// refFixture mirrors testdata/ref_stats.json, written by
// scripts/ref_stats.py with numpy 1.24.2 and scipy 1.10.1 (the versions
// are recorded in the file and checked below). Each case carries the exact
// call that produced it in its "call" field.
type refFixture struct {
	Generator string            `json:"generator"`
	Versions  map[string]string `json:"versions"`
	Interval  []struct {
		Scores    []float64 `json:"scores"`
		NTrain    int       `json:"n_train"`
		NTest     int       `json:"n_test"`
		Alpha     float64   `json:"alpha"`
		Call      string    `json:"call"`
		Mean      float64   `json:"mean"`
		Std       float64   `json:"std"`
		DF        int       `json:"df"`
		TQuantile float64   `json:"t_quantile"`
		Corrected struct {
			SE, Lo, Hi float64
		} `json:"corrected"`
		Naive struct {
			SE, Lo, Hi float64
		} `json:"naive"`
	} `json:"interval"`
	CorrectedT []struct {
		A, B   []float64
		NTrain int    `json:"n_train"`
		NTest  int    `json:"n_test"`
		Call   string `json:"call"`
		T      float64
		DF     int
		P      float64
	} `json:"corrected_t"`
	CorrectedTUneven struct {
		NTrain    []int     `json:"n_train"`
		NTest     []int     `json:"n_test"`
		A         []float64 `json:"a"`
		B         []float64 `json:"b"`
		MeanTrain float64   `json:"mean_train"`
		MeanTest  float64   `json:"mean_test"`
		Call      string    `json:"call"`
		T         float64   `json:"t"`
		DF        int       `json:"df"`
		P         float64   `json:"p"`
		Lo, Hi    float64
		TRounded  float64 `json:"t_rounded"`
		PRounded  float64 `json:"p_rounded"`
	} `json:"corrected_t_uneven"`
	FiveByTwo []struct {
		Diff [5][2]float64 `json:"diff"`
		Call string        `json:"call"`
		T, P float64
	} `json:"five_by_two"`
	McNemar []struct {
		B, C   int
		Call   string  `json:"call"`
		Chi2   float64 `json:"chi2"`
		P      float64 `json:"p"`
		PExact float64 `json:"p_exact"`
	} `json:"mcnemar"`
	Wilcoxon []struct {
		A, B    []float64
		Call    string  `json:"call"`
		T       float64 `json:"T"`
		PExact  float64 `json:"p_exact"`
		Z       float64 `json:"z"`
		PNormal float64 `json:"p_normal"`
	} `json:"wilcoxon"`
	WilcoxonDemsar struct {
		A, B []float64
		Call string  `json:"call"`
		T    float64 `json:"T"`
	} `json:"wilcoxon_demsar"`
	Friedman []struct {
		Name             string      `json:"name"`
		Scores           [][]float64 `json:"scores"`
		Call             string      `json:"call"`
		ChiSqTieCorr     float64     `json:"chi2_tie_corrected"`
		PChiSqTieCorrect float64     `json:"p_chi2_tie_corrected"`
		AvgRanks         []float64   `json:"avg_ranks"`
		ChiSq            float64     `json:"chi2"`
		PChiSq           float64     `json:"p_chi2"`
		F                float64     `json:"F"`
		P                float64     `json:"p"`
		FAnovaRanks      float64     `json:"F_anova_ranks"`
		CD               []struct {
			Alpha float64 `json:"alpha"`
			CD    float64 `json:"cd"`
		} `json:"cd"`
	} `json:"friedman"`
	StudentizedRange struct {
		PPFCall  string `json:"ppf_call"`
		NemenyiQ []struct {
			Alpha float64 `json:"alpha"`
			K     int     `json:"k"`
			Q     float64 `json:"q"`
		} `json:"nemenyi_q"`
		CDFCall string `json:"cdf_call"`
		CDF     []struct {
			Q float64 `json:"q"`
			K int     `json:"k"`
			P float64 `json:"p"`
		} `json:"cdf"`
	} `json:"studentized_range"`
	Wilson struct {
		Call  string `json:"call"`
		Cases []struct {
			K, N   int
			Alpha  float64 `json:"alpha"`
			Lo, Hi float64
		} `json:"cases"`
	} `json:"wilson"`
}

var loadRef = sync.OnceValues(func() (*refFixture, error) {
	b, err := os.ReadFile("testdata/ref_stats.json")
	if err != nil {
		return nil, err
	}
	var f refFixture
	if err := json.Unmarshal(b, &f); err != nil {
		return nil, err
	}
	return &f, nil
})

func ref(t *testing.T) *refFixture {
	t.Helper()
	f, err := loadRef()
	if err != nil {
		t.Fatalf("read fixture: %v", err)
	}
	return f
}

func TestFixtureVersions(t *testing.T) {
	f := ref(t)
	// The fixture must come from the reference libraries named in
	// scripts/ref_stats.py; a regeneration with other versions is a change
	// to review, not a silent update.
	want := map[string]string{"numpy": "1.24.2", "scipy": "1.10.1"}
	for _, lib := range []string{"numpy", "scipy"} {
		if got := f.Versions[lib]; got != want[lib] {
			t.Errorf("fixture %s version = %q, want %q", lib, got, want[lib])
		}
	}
	if f.Generator != "scripts/ref_stats.py" {
		t.Errorf("fixture generator = %q", f.Generator)
	}
}

// near reports whether got agrees with want within abs or rel tolerance;
// NaN agrees only with NaN and infinities only with themselves.
func near(got, want, absTol, relTol float64) bool {
	switch {
	case math.IsNaN(want):
		return math.IsNaN(got)
	case math.IsInf(want, 0):
		return math.IsInf(got, int(math.Copysign(1, want)))
	}
	return scalar.EqualWithinAbsOrRel(got, want, absTol, relTol)
}

func checkNear(t *testing.T, what string, got, want, absTol, relTol float64) {
	t.Helper()
	if !near(got, want, absTol, relTol) {
		t.Errorf("%s = %.17g, want %.17g (abs tol %g, rel tol %g)", what, got, want, absTol, relTol)
	}
}
