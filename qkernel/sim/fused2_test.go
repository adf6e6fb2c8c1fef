package sim

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"fringe/qkernel/circuit"
)

// TestFusedGate2: the one-pass fusedGate2 gives exactly (bit for bit) the
// density matrix of the separate passes it replaces, for CNOT and CZ, with
// complex and real (relaxation, phase-covariant) superoperators before the
// gate or none, on low and high bits (both bits >= 8 takes quad's split
// path) and both qubit orders.
func TestFusedGate2(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	relax, err := ThermalRelaxationKraus(0.3, 100, 80)
	if err != nil {
		t.Fatal(err)
	}
	unitaries := func() Superop {
		return KrausSuperop([]Matrix{randomUnitary(rng)}).Then(DepolarizingSuperop(0.01))
	}
	supers := map[string]func() *Superop{
		"none":    func() *Superop { return nil },
		"complex": func() *Superop { s := unitaries(); return &s },
		"relax":   func() *Superop { s := KrausSuperop(relax); return &s },
		"real":    func() *Superop { s := KrausSuperop([]Matrix{{{0.6, -0.8}, {0.8, 0.6}}}); return &s },
	}
	names := []string{"none", "complex", "relax", "real"}
	for _, tc := range []struct{ n, t, c int }{{3, 0, 1}, {3, 2, 0}, {5, 1, 4}, {10, 8, 9}, {10, 9, 2}} {
		for _, g := range []circuit.Gate{circuit.CNOT, circuit.CZ} {
			for _, pt := range names {
				for _, pc := range names {
					if tc.n == 10 && pt != pc {
						continue // the large cases: the diagonal of the table only
					}
					name := fmt.Sprintf("n=%d/t=%d/c=%d/gate=%v/pre=%s,%s", tc.n, tc.t, tc.c, g, pt, pc)
					sT, sC := supers[pt](), supers[pc]()
					base := densityFromDense(tc.n, randomDensity(rng, tc.n))
					want := &Density{N: base.N, Rho: slices.Clone(base.Rho)}
					if sT != nil {
						want.ApplySuperop1(tc.t, *sT)
					}
					if sC != nil {
						want.ApplySuperop1(tc.c, *sC)
					}
					const p = 0.013
					if g == circuit.CNOT {
						want.applyCNOTNoise(tc.c, tc.t, p, nil)
					} else {
						want.ApplyCZ(tc.c, tc.t)
						want.Depolarize2(tc.t, tc.c, p)
					}
					got := &Density{N: base.N, Rho: slices.Clone(base.Rho)}
					got.fusedGate2(tc.t, tc.c, sT, sC, g, p)
					for i := range want.Rho {
						w, h := want.Rho[i], got.Rho[i]
						if math.Float64bits(real(w)) != math.Float64bits(real(h)) || math.Float64bits(imag(w)) != math.Float64bits(imag(h)) {
							t.Fatalf("%s: entry %d: fused %v, separate passes %v", name, i, h, w)
						}
					}
				}
			}
		}
	}
}
