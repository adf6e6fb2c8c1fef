package sim

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"fringe/qkernel/circuit"
)

// dense is a small dense complex matrix used as a slow reference.
type dense [][]complex128

func newDense(n int) dense {
	m := make(dense, n)
	for i := range m {
		m[i] = make([]complex128, n)
	}
	return m
}

func (a dense) mul(b dense) dense {
	n := len(a)
	c := newDense(n)
	for i := range n {
		for k := range n {
			if a[i][k] == 0 {
				continue
			}
			for j := range n {
				c[i][j] += a[i][k] * b[k][j]
			}
		}
	}
	return c
}

func (a dense) adjoint() dense {
	n := len(a)
	c := newDense(n)
	for i := range n {
		for j := range n {
			c[j][i] = cmplx.Conj(a[i][j])
		}
	}
	return c
}

// embed1 returns the 2^n matrix of u acting on qubit q (basis bit q).
func embed1(n, q int, u Matrix) dense {
	D := 1 << n
	m := newDense(D)
	for r := range D {
		for c := range D {
			if r&^(1<<q) != c&^(1<<q) {
				continue
			}
			m[r][c] = u[r>>q&1][c>>q&1]
		}
	}
	return m
}

// cnotMatrix returns the 2^n permutation matrix of CNOT(c -> t).
func cnotMatrix(n, c, t int) dense {
	D := 1 << n
	m := newDense(D)
	for b := range D {
		out := b
		if b>>c&1 == 1 {
			out ^= 1 << t
		}
		m[out][b] = 1
	}
	return m
}

// applyKrausDense returns sum_K K rho K^dagger with K embedded on qubit q.
func applyKrausDense(rho dense, n, q int, ks []Matrix) dense {
	out := newDense(len(rho))
	for _, k := range ks {
		K := embed1(n, q, k)
		t := K.mul(rho).mul(K.adjoint())
		for i := range out {
			for j := range out {
				out[i][j] += t[i][j]
			}
		}
	}
	return out
}

func densityFromDense(n int, rho dense) *Density {
	d := &Density{N: n, Rho: make([]complex128, 1<<(2*n))}
	for r := range rho {
		for c := range rho {
			d.Rho[r<<n|c] = rho[r][c]
		}
	}
	return d
}

// randomDensity returns a random full-rank density matrix sum_i p_i |psi_i><psi_i|.
func randomDensity(rng *rand.Rand, n int) dense {
	D := 1 << n
	rho := newDense(D)
	for range 3 {
		psi := randomAmps(rng, n)
		w := rng.Float64()
		for r := range D {
			for c := range D {
				rho[r][c] += complex(w, 0) * psi[r] * cmplx.Conj(psi[c])
			}
		}
	}
	var tr complex128
	for i := range D {
		tr += rho[i][i]
	}
	for r := range D {
		for c := range D {
			rho[r][c] /= tr
		}
	}
	return rho
}

func randomAmps(rng *rand.Rand, n int) []complex128 {
	psi := make([]complex128, 1<<n)
	s := 0.0
	for i := range psi {
		psi[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		s += real(psi[i])*real(psi[i]) + imag(psi[i])*imag(psi[i])
	}
	for i := range psi {
		psi[i] /= complex(math.Sqrt(s), 0)
	}
	return psi
}

func randomUnitary(rng *rand.Rand) Matrix {
	// exp(i a) [[cos t e^{i b}, -sin t e^{-i c}], [sin t e^{i c}, cos t e^{-i b}]]
	a, b, c, t := rng.Float64()*6, rng.Float64()*6, rng.Float64()*6, rng.Float64()*6
	g := cmplx.Exp(complex(0, a))
	e := func(x float64) complex128 { return cmplx.Exp(complex(0, x)) }
	ct, st := complex(math.Cos(t), 0), complex(math.Sin(t), 0)
	return Matrix{{g * ct * e(b), -g * st * e(-c)}, {g * st * e(c), g * ct * e(-b)}}
}

// checkDensity checks that rho is Hermitian with unit trace and a
// non-negative diagonal, within tol.
func checkDensity(t *testing.T, d *Density, tol float64, what string) {
	t.Helper()
	D := 1 << d.N
	for r := range D {
		for c := 0; c <= r; c++ {
			if cmplx.Abs(d.At(r, c)-cmplx.Conj(d.At(c, r))) > tol {
				t.Fatalf("%s: rho[%d][%d] = %v, rho[%d][%d] = %v: not Hermitian", what, r, c, d.At(r, c), c, r, d.At(c, r))
			}
		}
		if real(d.At(r, r)) < -tol {
			t.Fatalf("%s: negative population %v at %d", what, d.At(r, r), r)
		}
	}
	if tr := d.Trace(); cmplx.Abs(tr-1) > tol {
		t.Fatalf("%s: trace %v, want 1", what, tr)
	}
}

type instance struct {
	test   []float64
	train  [][]float64
	y      []int
	nClass int
	w      []float64
}

func randomInstance(rng *rand.Rand, M, d, nClass int, balanced bool) instance {
	in := instance{test: make([]float64, d), train: make([][]float64, M), y: make([]int, M), nClass: nClass}
	for i := range in.test {
		in.test[i] = rng.NormFloat64()
	}
	for m := range in.train {
		in.train[m] = make([]float64, d)
		for i := range in.train[m] {
			in.train[m][i] = rng.NormFloat64()
		}
		in.y[m] = m % nClass
		if m >= nClass {
			in.y[m] = rng.IntN(nClass)
		}
	}
	if balanced {
		var err error
		if in.w, err = circuit.BalancedWeights(in.y, nClass); err != nil {
			panic(err)
		}
	}
	return in
}

func (in instance) compile(t *testing.T) *circuit.Circuit {
	t.Helper()
	c, err := circuit.Compile(in.test, in.train, in.y, in.nClass, in.w)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// closedForm returns P(a, k) at index a*2^q + k from the formulas of
// Schuld et al. (2017) with index weights: P(0,k) = sum_{m in k} w_m
// ||x~ + x_m||^2/4 and, derived by hand the same way (the H sends the
// a = 1 branch to x~ - x_m), P(1,k) = sum_{m in k} w_m ||x~ - x_m||^2/4.
func (in instance) closedForm(q int) []float64 {
	unit := func(x []float64) []float64 {
		s := 0.0
		for _, v := range x {
			s += v * v
		}
		out := make([]float64, len(x))
		for i, v := range x {
			out[i] = v / math.Sqrt(s)
		}
		return out
	}
	xt := unit(in.test)
	p := make([]float64, 2<<q)
	for m, row := range in.train {
		w := 1 / float64(len(in.train))
		if in.w != nil {
			w = in.w[m]
		}
		xm := unit(row)
		plus, minus := 0.0, 0.0
		for i := range xt {
			plus += (xt[i] + xm[i]) * (xt[i] + xm[i])
			minus += (xt[i] - xm[i]) * (xt[i] - xm[i])
		}
		p[in.y[m]] += w * plus / 4
		p[1<<q+in.y[m]] += w * minus / 4
	}
	return p
}
