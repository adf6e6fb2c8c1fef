package stats

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

func BenchmarkNemenyiQ(b *testing.B) {
	for _, k := range []int{3, 10, 30} {
		b.Run(fmt.Sprintf("k=%d", k), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				NemenyiQ(k, 0.05)
			}
		})
	}
}

func BenchmarkFriedman(b *testing.B) {
	for _, size := range [][2]int{{14, 4}, {100, 10}} {
		n, k := size[0], size[1]
		rng := rand.New(rand.NewPCG(uint64(n), uint64(k)))
		scores := make([][]float64, n)
		for i := range scores {
			scores[i] = make([]float64, k)
			for j := range scores[i] {
				scores[i][j] = float64(rng.IntN(1000)) / 1000
			}
		}
		b.Run(fmt.Sprintf("datasets=%d/models=%d", n, k), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Friedman(scores, 0.05); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "datasets/s")
		})
	}
}

func BenchmarkWilcoxon(b *testing.B) {
	for _, n := range []int{14, WilcoxonExactMaxN, 200} {
		rng := rand.New(rand.NewPCG(uint64(n), 7))
		x := make([]float64, n)
		y := make([]float64, n)
		for i := range x {
			x[i] = rng.Float64()
			y[i] = rng.Float64()
		}
		b.Run(fmt.Sprintf("pairs=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Wilcoxon(x, y, 0.05); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "pairs/s")
		})
	}
}

func BenchmarkCorrectedInterval(b *testing.B) {
	rng := rand.New(rand.NewPCG(10, 10))
	scores := make([]float64, 100)
	for i := range scores {
		scores[i] = 0.9 + 0.05*rng.NormFloat64()
	}
	b.Run("scores=100", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := CorrectedInterval(scores, 135, 15, 0.05); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(len(scores))*float64(b.N)/b.Elapsed().Seconds(), "scores/s")
	})
}
