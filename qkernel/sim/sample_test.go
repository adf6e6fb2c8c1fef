package sim

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestBinomialMoments draws R variates in both regimes of binomial
// (inversion for n p < 10, gonum's rejection above) and checks the sample
// mean against n p and the sample variance against n p (1-p), each within 5
// standard errors: se(mean) = sqrt(npq/R), se(var) = sqrt((mu4 - sigma^4)/R)
// with the binomial fourth central moment mu4 = npq (1 + 3 pq (n-2))
// (standard result, recalled from memory).
func TestBinomialMoments(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	const R = 40000
	for _, tc := range []struct {
		n int
		p float64
	}{
		{1, 0.3}, {20, 0.4}, {30, 0.02}, {1000, 0.004}, {1000, 0.3}, {1000000, 0.25}, {1000000, 0.9999}, {1 << 40, 1e-3},
	} {
		var s, s2 float64
		for range R {
			k := binomial(tc.n, tc.p, rng)
			if k < 0 || k > tc.n {
				t.Fatalf("n=%d p=%v: draw %d out of range", tc.n, tc.p, k)
			}
			x := float64(k)
			s += x
			s2 += x * x
		}
		n := float64(tc.n)
		q := 1 - tc.p
		mean, v := n*tc.p, n*tc.p*q
		gotMean := s / R
		gotVar := (s2 - s*s/R) / (R - 1)
		mu4 := v * (1 + 3*tc.p*q*(n-2))
		seMean := math.Sqrt(v / R)
		seVar := math.Sqrt(math.Max(mu4-v*v, 0) / R)
		if math.Abs(gotMean-mean) > 5*seMean {
			t.Errorf("n=%d p=%v: mean %v, want %v ± %v", tc.n, tc.p, gotMean, mean, seMean)
		}
		if math.Abs(gotVar-v) > 5*seVar {
			t.Errorf("n=%d p=%v: variance %v, want %v ± %v", tc.n, tc.p, gotVar, v, seVar)
		}
	}
}

// TestBinomialPMF compares the empirical frequencies of the inversion
// branch with the exact pmf (gonum distuv.Binomial.Prob, v0.17.0) within 5
// standard errors of a proportion.
func TestBinomialPMF(t *testing.T) {
	rng := rand.New(rand.NewPCG(43, 44))
	const R = 50000
	for _, tc := range []struct {
		n int
		p float64
	}{{40, 0.1}, {200, 0.02}, {60, 0.7}} {
		counts := make([]int, tc.n+1)
		for range R {
			counts[binomial(tc.n, tc.p, rng)]++
		}
		ref := distuv.Binomial{N: float64(tc.n), P: tc.p}
		for k, c := range counts {
			pk := ref.Prob(float64(k))
			se := math.Sqrt(pk * (1 - pk) / R)
			if got := float64(c) / R; math.Abs(got-pk) > 5*se+1e-9 {
				t.Errorf("n=%d p=%v: P(%d) empirical %v, exact %v ± %v", tc.n, tc.p, k, got, pk, se)
			}
		}
	}
}

// TestSampleCounts checks one multinomial draw per repeat over R repeats:
// counts sum to shots, zero-probability outcomes never occur, and the
// mean, variance and covariance of the counts match N p_i, N p_i (1-p_i)
// and -N p_i p_j (multinomial moments, common practice) within 5 standard
// errors (se(mean) = sqrt(N p q / R); se(var) from the fourth moment as in
// TestBinomialMoments, since each count is binomial; se(cov) bounded by
// sqrt(var_i var_j / R)).
func TestSampleCounts(t *testing.T) {
	rng := rand.New(rand.NewPCG(45, 46))
	p := []float64{0.3, 0, 0.05, 0.15, 1e-4, 0.2, 0.2999, 0}
	const R = 20000
	for _, shots := range []int{7, 1000, 1000000} {
		N := float64(shots)
		var s, s2 [8]float64
		var s02 float64 // sum of c0 * c2 for the covariance
		for range R {
			c := SampleCounts(p, shots, rng)
			tot := 0
			for i, v := range c {
				tot += v
				if p[i] == 0 && v != 0 {
					t.Fatalf("outcome %d with probability 0 drawn %d times", i, v)
				}
				s[i] += float64(v)
				s2[i] += float64(v) * float64(v)
			}
			if tot != shots {
				t.Fatalf("counts %v sum to %d, want %d", c, tot, shots)
			}
			s02 += float64(c[0]) * float64(c[2])
		}
		for i, pi := range p {
			mean, v := N*pi, N*pi*(1-pi)
			gotMean := s[i] / R
			gotVar := (s2[i] - s[i]*s[i]/R) / (R - 1)
			seMean := math.Sqrt(v / R)
			mu4 := v * (1 + 3*pi*(1-pi)*(N-2))
			seVar := math.Sqrt(math.Max(mu4-v*v, 0) / R)
			if math.Abs(gotMean-mean) > 5*seMean+1e-12 || math.Abs(gotVar-v) > 5*seVar+1e-12 {
				t.Errorf("shots=%d outcome %d: mean %v var %v, want %v ± %v and %v ± %v", shots, i, gotMean, gotVar, mean, seMean, v, seVar)
			}
		}
		cov := s02/R - (s[0]/R)*(s[2]/R)
		want := -N * p[0] * p[2]
		se := math.Sqrt(N*p[0]*(1-p[0])*N*p[2]*(1-p[2])/R) * math.Sqrt(2)
		if math.Abs(cov-want) > 5*se {
			t.Errorf("shots=%d: cov(c0, c2) = %v, want %v ± %v", shots, cov, want, se)
		}
	}
	if c := SampleCounts([]float64{0.5, 0.5}, 0, rng); c[0] != 0 || c[1] != 0 {
		t.Errorf("zero shots: %v", c)
	}
	if c := SampleCounts([]float64{0, 2, 0}, 5, rng); c[1] != 5 {
		t.Errorf("single outcome with mass: %v", c)
	}
	for _, bad := range []struct {
		p     []float64
		shots int
	}{{[]float64{0.5, -0.1}, 3}, {[]float64{0, 0}, 3}, {[]float64{1}, -1}, {[]float64{math.NaN()}, 1}} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("SampleCounts(%v, %d): no panic", bad.p, bad.shots)
				}
			}()
			SampleCounts(bad.p, bad.shots, rng)
		}()
	}
}

func ExampleSampleCounts() {
	rng := rand.New(rand.NewPCG(1, 2))
	c := SampleCounts([]float64{0.25, 0.25, 0.5, 0}, 1000, rng)
	fmt.Println(c[0]+c[1]+c[2]+c[3], c[3])
	// Output: 1000 0
}
