package plan

import (
	"encoding/binary"
	"fmt"
	"hash/fnv"
	"math/rand/v2"
)

// ModelSeed is the seed a task's model gets. It is derived from the run
// seed and the task key, except for interference models: they get one seed
// per (dataset, repeat, fold), shared by every interference model and
// pipeline of the run, so that on each test instance they draw the same
// training subset and the same random stream (common random numbers) and
// their differences (shots against exact, noise against none) are paired.
func (p *Plan) ModelSeed(t Task) uint64 {
	ms := p.Spec.Models[t.Model]
	if ms.Kind == "interference" {
		d := p.Datasets[t.Dataset]
		sp := d.Splits[t.Split]
		return Seed(p.Spec.Seed, "interference", d.Name, fmt.Sprint(sp.Repeat), fmt.Sprint(sp.Fold))
	}
	return Seed(p.Spec.Seed, "task", p.Key(t))
}

// InterferenceSeed is the seed of the interference models on split si of
// dataset di: the value ModelSeed gives them (tested), so that exported
// circuits, counts models and simulated shots draw the same training
// subsets and random streams.
func (p *Plan) InterferenceSeed(di, si int) uint64 {
	d := p.Datasets[di]
	sp := d.Splits[si]
	return Seed(p.Spec.Seed, "interference", d.Name, fmt.Sprint(sp.Repeat), fmt.Sprint(sp.Fold))
}

// Seed derives a 64-bit seed from the run seed and a list of key parts
// (FNV-1a over the parts, separated by NUL bytes). The same seed and parts
// always give the same value, independent of scheduling.
func Seed(seed uint64, parts ...string) uint64 {
	h := fnv.New64a()
	var b [8]byte
	binary.LittleEndian.PutUint64(b[:], seed)
	h.Write(b[:])
	for _, p := range parts {
		h.Write([]byte(p))
		h.Write([]byte{0})
	}
	return h.Sum64()
}

// NewRand returns a PCG generator seeded from the run seed and key parts.
func NewRand(seed uint64, parts ...string) *rand.Rand {
	return rand.New(rand.NewPCG(seed, Seed(seed, parts...)))
}
