package qkernel

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"

	"fringe/qkernel/sim"
)

// TestMitigateHandDerived checks MitigateReadout on examples worked by hand.
func TestMitigateHandDerived(t *testing.T) {
	// Two qubits, bit 0 with (p01, p10) = (0.1, 0.2): C0 = [[0.9, 0.2],
	// [0.1, 0.8]]; bit 1 with (0.05, 0.1): C1 = [[0.95, 0.1], [0.05, 0.9]].
	// True p = (0.5, 0.2, 0.2, 0.1) at indices 00, 01, 10, 11 (bit 1, bit 0).
	// C0 on the pairs (p0, p1) = (0.5, 0.2) and (p2, p3) = (0.2, 0.1):
	//   (0.9*0.5 + 0.2*0.2, 0.1*0.5 + 0.8*0.2) = (0.49, 0.21)
	//   (0.9*0.2 + 0.2*0.1, 0.1*0.2 + 0.8*0.1) = (0.20, 0.10)
	// then C1 on the pairs (q0, q2) = (0.49, 0.20) and (q1, q3) = (0.21, 0.10):
	//   (0.95*0.49 + 0.1*0.20, 0.05*0.49 + 0.9*0.20) = (0.4855, 0.2045)
	//   (0.95*0.21 + 0.1*0.10, 0.05*0.21 + 0.9*0.10) = (0.2095, 0.1005)
	// so the device reports (0.4855, 0.2095, 0.2045, 0.1005) (sum 1), and
	// mitigation must return p.
	conf := []Confusion{ReadoutConfusion(0.1, 0.2), ReadoutConfusion(0.05, 0.1)}
	got, err := MitigateReadout([]float64{0.4855, 0.2095, 0.2045, 0.1005}, conf)
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{0.5, 0.2, 0.2, 0.1} {
		// 1e-14: a few rounded products of numbers near 1.
		if !scalar.EqualWithinAbsOrRel(got[i], want, 1e-14, 0) {
			t.Errorf("two-qubit example: p[%d] = %.17g, want %v", i, got[i], want)
		}
	}
	// The same counts scaled (10000 shots) give the same distribution.
	got2, _ := MitigateReadout([]float64{4855, 2095, 2045, 1005}, conf)
	for i := range got {
		if !scalar.EqualWithinAbsOrRel(got2[i], got[i], 1e-14, 0) {
			t.Errorf("counts: p[%d] = %v, distribution gives %v", i, got2[i], got[i])
		}
	}

	// Projection needed: bit 0 as above, bit 1 without error, observed
	// (0.99, 0.01, 0, 0). C0^-1 = [[0.8, -0.2], [-0.1, 0.9]] / 0.7, so the
	// pair (0.99, 0.01) -> ((0.792 - 0.002)/0.7, (-0.099 + 0.009)/0.7) =
	// (1.128571..., -0.128571...). Projection (Wang & Carreira-Perpiñán
	// 2013, Algorithm 1): sorted u = (1.1286, 0, 0, -0.1286); j = 1 gives
	// 1.1286 + (1 - 1.1286) = 1 > 0, j = 2 gives 0 - 0.0643 < 0; so rho = 1,
	// lambda = -0.128571 and x = (1, 0, 0, 0).
	got, err = MitigateReadout([]float64{0.99, 0.01, 0, 0}, []Confusion{ReadoutConfusion(0.1, 0.2), ReadoutConfusion(0, 0)})
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{1, 0, 0, 0} {
		if !scalar.EqualWithinAbsOrRel(got[i], want, 1e-15, 0) {
			t.Errorf("projection example: p[%d] = %v, want %v", i, got[i], want)
		}
	}

	// The projection alone: y = (0.6, 0.5, -0.2, 0.1), sorted (0.6, 0.5,
	// 0.1, -0.2); the partial sums give 0.6 + 0.4 > 0, 0.5 - 0.05 > 0,
	// 0.1 - 0.2/3 > 0, -0.2 + 0 = -0.2 < 0: rho = 3, lambda = (1 - 1.2)/3 =
	// -1/15, x = (0.6 - 1/15, 0.5 - 1/15, 0, 0.1 - 1/15).
	y := []float64{0.6, 0.5, -0.2, 0.1}
	projectSimplex(y)
	for i, want := range []float64{0.6 - 1.0/15, 0.5 - 1.0/15, 0, 0.1 - 1.0/15} {
		if !scalar.EqualWithinAbsOrRel(y[i], want, 1e-15, 0) {
			t.Errorf("projection: x[%d] = %v, want %v", i, y[i], want)
		}
	}
}

type mitigationCase struct {
	Bits      int             `json:"bits"`
	Confusion [][2][2]float64 `json:"confusion"`
	True      []float64       `json:"true"`
	Observed  []float64       `json:"observed"`
	Shots     int             `json:"shots"`
	Measured  []float64       `json:"measured"`
	Inverse   []float64       `json:"inverse"`
	Projected []float64       `json:"projected"`
}

// TestMitigateAgainstScipy compares with scripts/ref_mitigation.py (numpy
// 1.24.2 np.linalg.solve with the full np.kron confusion matrix; scipy
// 1.10.1 scipy.optimize.minimize(method="SLSQP") for the projection): the
// bit-by-bit inverse within 1e-12 (the same linear map, rounded
// differently), the projection within 1e-8 (SLSQP's accuracy at ftol
// 1e-15), and the exact device distribution back to the true one within
// 1e-12.
func TestMitigateAgainstScipy(t *testing.T) {
	raw, err := os.ReadFile("testdata/ref_mitigation.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []mitigationCase `json:"cases"`
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) != 5 {
		t.Fatalf("%d cases in the fixture, want 5", len(ref.Cases))
	}
	for ci, c := range ref.Cases {
		conf := make([]Confusion, len(c.Confusion))
		for b, m := range c.Confusion {
			conf[b] = Confusion(m)
		}
		inv := make([]float64, len(c.Measured))
		for i, v := range c.Measured {
			inv[i] = v / float64(c.Shots)
		}
		if err := invertReadout(inv, conf); err != nil {
			t.Fatal(err)
		}
		for i := range inv {
			if !scalar.EqualWithinAbsOrRel(inv[i], c.Inverse[i], 1e-12, 1e-12) {
				t.Errorf("case %d: inverse[%d] = %.17g, numpy %.17g", ci, i, inv[i], c.Inverse[i])
			}
		}
		got, err := MitigateReadout(c.Measured, conf)
		if err != nil {
			t.Fatal(err)
		}
		sum := 0.0
		for i := range got {
			if !scalar.EqualWithinAbsOrRel(got[i], c.Projected[i], 1e-8, 0) {
				t.Errorf("case %d: projected[%d] = %.12g, scipy %.12g", ci, i, got[i], c.Projected[i])
			}
			if got[i] < 0 {
				t.Errorf("case %d: negative probability %v", ci, got[i])
			}
			sum += got[i]
		}
		if !scalar.EqualWithinAbsOrRel(sum, 1, 1e-14, 0) {
			t.Errorf("case %d: mitigated distribution sums to %v", ci, sum)
		}
		back, err := MitigateReadout(c.Observed, conf)
		if err != nil {
			t.Fatal(err)
		}
		for i := range back {
			if !scalar.EqualWithinAbsOrRel(back[i], c.True[i], 1e-12, 0) {
				t.Errorf("case %d: true[%d] = %v, recovered %v", ci, i, c.True[i], back[i])
			}
		}
	}
}

// TestConfusionFromCounts: the observed frequencies (derived by hand:
// 970/1000, 30/1000, 50/1000, 950/1000) and the errors.
func TestConfusionFromCounts(t *testing.T) {
	c, err := ConfusionFromCounts([2]int{970, 30}, [2]int{50, 950})
	if err != nil {
		t.Fatal(err)
	}
	want := ReadoutConfusion(0.03, 0.05)
	for i := range 2 {
		for j := range 2 {
			if !scalar.EqualWithinAbsOrRel(c[i][j], want[i][j], 1e-15, 0) {
				t.Errorf("C[%d][%d] = %v, want %v", i, j, c[i][j], want[i][j])
			}
		}
	}
	if _, err := ConfusionFromCounts([2]int{0, 0}, [2]int{1, 1}); !errors.Is(err, ErrCounts) {
		t.Errorf("no shots: err = %v", err)
	}
	if _, err := ConfusionFromCounts([2]int{5, -1}, [2]int{1, 1}); !errors.Is(err, ErrCounts) {
		t.Errorf("negative count: err = %v", err)
	}
	// An uninformative qubit (p01 + p10 = 1) cannot be inverted.
	bad, _ := ConfusionFromCounts([2]int{1, 1}, [2]int{1, 1})
	if _, err := MitigateReadout([]float64{1, 1}, []Confusion{bad}); !errors.Is(err, ErrConfusion) {
		t.Errorf("singular confusion: err = %v", err)
	}
	if _, err := MitigateReadout([]float64{1, 1, 1}, []Confusion{want}); !errors.Is(err, ErrCounts) {
		t.Errorf("3 outcomes: err = %v", err)
	}
	if _, err := MitigateReadout([]float64{1, 1, 1, 1}, []Confusion{want, want, want}); !errors.Is(err, ErrConfusion) {
		t.Errorf("3 matrices for 2 bits: err = %v", err)
	}
}

// kronConfusion returns the full 2^n x 2^n confusion matrix of n bits with
// the same matrix c (bit b of the index is bit b's reading), for tests.
func kronConfusion(c Confusion, n int) *mat.Dense {
	N := 1 << n
	A := mat.NewDense(N, N, nil)
	for i := range N {
		for j := range N {
			v := 1.0
			for b := range n {
				v *= c[i>>b&1][j>>b&1]
			}
			A.Set(i, j, v)
		}
	}
	return A
}

// TestMitigationRecoversNoiseless simulates shots under readout error
// (ModeNoisy, Noise.Readout only, so the noiseless distribution is the
// closed form) on Iris (3 classes: the outcome has 1 + 2 bits) and requires
// the mitigated P(a=0, k), P(a=0, unused code) and P(a=1) to equal the
// noiseless ones within 5 standard errors, the standard error taken from
// the multinomial covariance of the observed frequencies through the
// inverse confusion map (the projection onto the simplex, when active,
// moves the estimate toward the simplex that holds the truth). The raw
// estimates must miss by more than that, or the test would prove nothing.
func TestMitigationRecoversNoiseless(t *testing.T) {
	f := firstFold(t, "iris", 10)
	const shots = 400000
	ro := [2]float64{0.04, 0.09}
	exact := &Classifier{Balance: true}
	_, ed := fitPredict(t, exact, f.Xtr, f.ytr, f.nClass, f.Xte)
	c := &Classifier{Mode: ModeNoisy, Balance: true, Shots: shots, Seed: 5, Noise: sim.NoiseModel{Readout: ro}, Mitigate: Mitigation{Readout: true}}
	_, md := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	A := kronConfusion(ReadoutConfusion(ro[0], ro[1]), 3)
	var Ainv mat.Dense
	if err := Ainv.Inverse(A); err != nil {
		t.Fatal(err)
	}
	rawMiss := false
	for i := range md {
		if md[i].Raw == nil {
			t.Fatalf("row %d: no raw decision", i)
		}
		// Noiseless joint distribution at a*4 + k (k = 3 is unused).
		p := make([]float64, 8)
		for k := range 3 {
			p[k] = ed[i].PAcc * ed[i].Probs[k]
		}
		pacc := ed[i].PAcc
		q := mat.NewVecDense(8, nil)
		// P(a=1, k) of the closed form is not in Detail; the checks below
		// use only sums over a = 1, so give the a = 1 mass to k = 0.
		p[4] = 1 - pacc
		q.MulVec(A, mat.NewVecDense(8, p))
		// Covariance of the frequencies, then of the inverse estimate.
		cov := mat.NewDense(8, 8, nil)
		for a := range 8 {
			for b := range 8 {
				v := -q.AtVec(a) * q.AtVec(b)
				if a == b {
					v += q.AtVec(a)
				}
				cov.Set(a, b, v/shots)
			}
		}
		var tmp, covInv mat.Dense
		tmp.Mul(&Ainv, cov)
		covInv.Mul(&tmp, Ainv.T())
		se := func(w []float64) float64 {
			wv := mat.NewVecDense(8, w)
			var cw mat.VecDense
			cw.MulVec(&covInv, wv)
			return math.Sqrt(mat.Dot(wv, &cw))
		}
		checks := []struct {
			name     string
			w        []float64
			want     float64
			got, raw float64
		}{
			{"P(a=1)", []float64{0, 0, 0, 0, 1, 1, 1, 1}, 1 - pacc, 1 - md[i].PAcc, 1 - md[i].Raw.PAcc},
			{"P(a=0, unused)", []float64{0, 0, 0, 1, 0, 0, 0, 0}, 0, md[i].PAcc * md[i].Unused, md[i].Raw.PAcc * md[i].Raw.Unused},
		}
		for k := range 3 {
			w := make([]float64, 8)
			w[k] = 1
			checks = append(checks, struct {
				name     string
				w        []float64
				want     float64
				got, raw float64
			}{"P(a=0, k)", w, p[k], md[i].PAcc * md[i].Probs[k], md[i].Raw.PAcc * md[i].Raw.Probs[k]})
		}
		for _, ch := range checks {
			s := se(ch.w)
			if d := math.Abs(ch.got - ch.want); d > 5*s {
				t.Errorf("row %d %s: mitigated %.6f, noiseless %.6f, off by %.1f standard errors (%.2g)", i, ch.name, ch.got, ch.want, d/s, s)
			}
			if math.Abs(ch.raw-ch.want) > 5*s {
				rawMiss = true
			}
		}
		if sum := sumOf(md[i].Probs) + md[i].Unused; !scalar.EqualWithinAbsOrRel(sum, 1, 1e-12, 0) {
			t.Errorf("row %d: mitigated probs and unused sum to %v", i, sum)
		}
	}
	if !rawMiss {
		t.Error("the raw estimates are within 5 standard errors of the noiseless ones: readout error too weak for the test")
	}
}

func sumOf(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s
}

// TestUnusedMass: Detail.Unused is 0 without noise, positive under noise
// for 3 classes (the class register has 4 codes), and sum(Probs) + Unused
// = 1 with probabilities (within 1e-12) and with shots (exactly, up to the
// division); Probs keep their meaning (not renormalised).
func TestUnusedMass(t *testing.T) {
	f := firstFold(t, "iris", 10)
	for _, tc := range []struct {
		c        Classifier
		positive bool
	}{
		{Classifier{}, false},
		{Classifier{Mode: ModeShots, Shots: 1000, Seed: 1}, false},
		{Classifier{Mode: ModeNoisy, Channels: Channels{GlobalDepolarizing: 0.2}}, true},
		{Classifier{Mode: ModeNoisy, Shots: 5000, Seed: 1, Channels: Channels{Readout: [2]float64{0.05, 0.05}}}, true},
		{Classifier{Mode: ModeNoisy, TrainSubset: 6, Noise: sim.NoiseModel{Depolarizing: [2]float64{0.02, 0.05}}}, true},
	} {
		_, det := fitPredict(t, &tc.c, f.Xtr, f.ytr, f.nClass, f.Xte)
		for i, d := range det {
			if !tc.positive && d.Unused != 0 {
				t.Errorf("mode %v row %d: unused %v without noise", tc.c.Mode, i, d.Unused)
			}
			if tc.positive && !(d.Unused > 0) {
				t.Errorf("mode %v row %d: unused %v under noise", tc.c.Mode, i, d.Unused)
			}
			if s := sumOf(d.Probs) + d.Unused; !scalar.EqualWithinAbsOrRel(s, 1, 1e-12, 0) {
				t.Errorf("mode %v row %d: probs + unused = %v", tc.c.Mode, i, s)
			}
			if d.Raw != nil {
				t.Errorf("mode %v row %d: raw decision without mitigation", tc.c.Mode, i)
			}
		}
	}
}

// TestPredictCountsMitigation: imported counts with the identity confusion
// give the raw frequencies back (the same decision, Raw set); a real
// confusion moves the probabilities; mitigation without matrices or with
// the wrong number of them is an option error.
func TestPredictCountsMitigation(t *testing.T) {
	f := dropClass0(firstFold(t, "iris", 10)) // 2 classes: 1 + 1 bits, 4 outcomes
	X := f.Xte.Slice(0, 2, 0, 4).(*mat.Dense)
	counts := [][]int{{600, 250, 100, 50}, {200, 500, 200, 100}}
	base := &Classifier{Seed: 1}
	if err := base.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
		t.Fatal(err)
	}
	rawPred, rawDet, err := base.PredictCounts(X, counts)
	if err != nil {
		t.Fatal(err)
	}
	id := *base
	id.Mitigate = Mitigation{Readout: true, Confusion: []Confusion{ReadoutConfusion(0, 0)}}
	pred, det, err := id.PredictCounts(X, counts)
	if err != nil {
		t.Fatal(err)
	}
	for i := range pred {
		if pred[i] != rawPred[i] || det[i].Raw == nil || det[i].Raw.Pred != rawPred[i] {
			t.Errorf("identity confusion row %d: %d %+v, raw %d", i, pred[i], det[i], rawPred[i])
		}
		// 1e-15: the same frequencies through an identity map.
		if !scalar.EqualWithinAbsOrRel(det[i].PAcc, rawDet[i].PAcc, 1e-15, 0) || !scalar.EqualWithinAbsOrRel(det[i].Probs[0], rawDet[i].Probs[0], 1e-15, 0) {
			t.Errorf("identity confusion row %d: %+v, raw %+v", i, det[i], rawDet[i])
		}
	}
	// Row 0 by hand with the class bit read with (p01, p10) = (0.2, 0.2)
	// and an error-free ancilla: C^-1 = [[0.8, -0.2], [-0.2, 0.8]] / 0.6 on
	// the pairs (600, 250) and (100, 50) of 1000 shots: P(0,0) = (0.48 -
	// 0.05)/0.6 = 0.716667, P(0,1) = (-0.12 + 0.2)/0.6 = 0.133333, so
	// P(a=0) = 0.85 and P(1 | acc) = 0.156863.
	cls := *base
	cls.Mitigate = Mitigation{Readout: true, Confusion: []Confusion{ReadoutConfusion(0.2, 0.2), ReadoutConfusion(0, 0)}}
	_, det, err = cls.PredictCounts(X, counts)
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbsOrRel(det[0].PAcc, 0.85, 1e-14, 0) || !scalar.EqualWithinAbsOrRel(det[0].Probs[1], 0.08/0.6/0.85, 1e-14, 0) {
		t.Errorf("row 0 mitigated: %+v, want p_acc 0.85, P(1|acc) %.6f", det[0], 0.08/0.6/0.85)
	}
	for _, m := range []Mitigation{
		{Readout: true},
		{Readout: true, Confusion: []Confusion{ReadoutConfusion(0, 0), ReadoutConfusion(0, 0), ReadoutConfusion(0, 0)}},
		{Confusion: []Confusion{ReadoutConfusion(0, 0)}},
	} {
		bad := *base
		bad.Mitigate = m
		if _, _, err := bad.PredictCounts(X, counts); !errors.Is(err, ErrOption) {
			t.Errorf("mitigation %+v: err = %v, want ErrOption", m, err)
		}
	}
}

// TestMitigationOptions: Validate and Fit reject inconsistent mitigation
// options with key "mitigate".
func TestMitigationOptions(t *testing.T) {
	f := firstFold(t, "iris", 10)
	for _, c := range []Classifier{
		{Mitigate: Mitigation{Readout: true}},
		{Mode: ModeNoisy, Mitigate: Mitigation{Readout: true}},
		{Mode: ModeNoisy, Noise: sim.NoiseModel{Readout: [2]float64{0.6, 0.5}}, Mitigate: Mitigation{Readout: true}},
		{Mode: ModeNoisy, Mitigate: Mitigation{Confusion: []Confusion{ReadoutConfusion(0.1, 0.1)}}},
		{Mode: ModeNoisy, Mitigate: Mitigation{Readout: true, Confusion: []Confusion{{{0.9, 0.1}, {0.2, 0.9}}}}},
		{Mode: ModeNoisy, Mitigate: Mitigation{Readout: true, Confusion: []Confusion{ReadoutConfusion(0.1, 0.1), ReadoutConfusion(0.1, 0.1)}}}, // 3 bits
	} {
		err := c.Fit(f.Xtr, f.ytr, f.nClass)
		var oe *OptionError
		if !errors.As(err, &oe) || oe.Key != "mitigate" {
			t.Errorf("%+v: err = %v, want an option error for mitigate", c.Mitigate, err)
		}
	}
	ok := Classifier{Mode: ModeNoisy, Channels: Channels{Readout: [2]float64{0.02, 0.03}}, Mitigate: Mitigation{Readout: true}}
	if err := ok.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
		t.Errorf("mitigation of the channel's readout error: %v", err)
	}
}
