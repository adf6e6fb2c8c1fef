package qkernel

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/floats"

	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/qkernel/sim"
)

// scratch is the working space of one Predict call.
type scratch struct {
	x      []float64   // unit test row (len d)
	p0, p1 []float64   // closed-form P(a=0, c=k) and P(a=1, c=k) (len nClass)
	eprobs []float64   // exact-mode P(k | acc) (len nClass)
	dot    []float64   // per-class weighted inner products (len nClass)
	dist   []float64   // closed-form outcome distribution (len 2^(1+q))
	agg    []float64   // accepted outcomes and one rejected outcome (len 2^q + 1)
	idx    []int       // subset positions
	pool   []int       // permutation space for one class's members
	train  [][]float64 // subset rows (views into Classifier.unit)
	ysub   []int       // subset labels
	pcg    *rand.PCG   // re-seeded for every row
	rng    *rand.Rand  // draws from pcg
	share  *shareCache // prepared parts shared by rows (nil: none)
}

func (c *Classifier) newScratch(p *plan) *scratch {
	s := &scratch{
		x:      make([]float64, c.d),
		p0:     make([]float64, c.nClass),
		p1:     make([]float64, c.nClass),
		eprobs: make([]float64, c.nClass),
		dot:    make([]float64, c.nClass),
		dist:   make([]float64, 2<<p.qClass),
		agg:    make([]float64, 1<<p.qClass+1),
		pcg:    rand.NewPCG(0, 0),
	}
	s.rng = rand.New(s.pcg)
	if c.TrainSubset > 0 {
		big := 0
		for _, m := range c.members {
			big = max(big, len(m))
		}
		s.idx = make([]int, 0, p.m)
		s.pool = make([]int, big)
		s.train = make([][]float64, 0, p.m)
		s.ysub = make([]int, 0, p.m)
	}
	return s
}

// outcome is the result of one test row.
type outcome struct {
	pred, exact int
	pacc        float64
	shots       int
	unused      float64    // Detail.Unused
	raw         *RawDetail // the unmitigated decision (mitigation only)
}

// mitigates reports whether Predict mitigates readout errors.
func (c *Classifier) mitigates() bool { return c.Mode == ModeNoisy && c.Mitigate.Readout }

// row classifies the unit test vector s.x at position pos, writing
// P(k | acc) into probs (len nClass). With readout mitigation the raw
// decision's probabilities go to rawProbs (len nClass) and the mitigated
// ones to probs.
func (c *Classifier) row(ctx context.Context, p *plan, s *scratch, pos int, probs, rawProbs []float64) (outcome, error) {
	var rng *rand.Rand
	if c.Mode != ModeExact || c.TrainSubset > 0 {
		s.pcg.Seed(rowSeeds(c.Seed, pos)) // the same stream as rowRand(c.Seed, pos)
		rng = s.rng
	}

	// The training set of this row and the closed form on it.
	var w []float64
	var pacc float64
	if c.TrainSubset > 0 {
		c.drawSubset(s, p.alloc, rng)
		w = Weights(s.ysub, c.nClass, c.Balance)
		pacc = c.subsetJoint(s, w)
	} else {
		pacc = c.jointInto(s.p0, s.x)
		for k := range s.p1 {
			s.p1[k] = 0
		}
		for _, k := range c.present {
			s.p1[k] = math.Max(0, c.mass[k]-s.p0[k]) // (mass_k - <x, centre_k>)/2
		}
	}
	floor := float64(p.m+c.d+2) * eps
	var out outcome
	out.exact = decideProbs(s.eprobs, s.p0, pacc, floor, c.present)
	if c.Mode == ModeExact {
		copy(probs, s.eprobs)
		out.pred, out.pacc = out.exact, pacc
		out.unused = unusedShare(nil, 0, pacc, floor) // the closed form has no unused codes
		return out, nil
	}

	// The outcome distribution P(a, k) at index a*2^q + k.
	var dist []float64
	var conf []Confusion // the row's confusion matrices (mitigation on a device)
	if p.gate {
		train, ysub := s.train, s.ysub
		if c.TrainSubset == 0 {
			train, ysub = c.rows(s), c.y
			w = Weights(c.y, c.nClass, c.Balance)
		}
		circ, err := circuit.Compile(s.x, train, ysub, c.nClass, w)
		if err != nil {
			return out, err
		}
		noise := c.Noise
		noise.Readout = [2]float64{} // applied below, after the channels
		if c.Mode == ModeCircuit {
			noise = sim.NoiseModel{}
		}
		var res sim.Result
		if c.Device != nil && c.Mode == ModeNoisy {
			var prog *device.Program
			res, prog, err = c.deviceSimulate(ctx, circ, p, rng)
			if err == nil && c.mitigates() && c.Mitigate.Confusion == nil {
				conf = c.physicalConfusion(c.Device, prog, circ.Regs)
			}
		} else {
			res, err = s.share.simulate(ctx, ysub, circ, sim.Options{
				Noise: noise, Method: p.method, Trajectories: c.Trajectories, Rng: rng,
			})
		}
		if err != nil {
			return out, err
		}
		dist = res.P
		floor += float64(len(circ.Ops)+1<<circ.NQubits) * eps
	} else {
		dist = s.dist
		clear(dist)
		h := len(dist) / 2
		copy(dist, s.p0)
		copy(dist[h:], s.p1)
	}
	if c.Mode == ModeNoisy {
		var err error
		if dist, err = c.channels(dist); err != nil {
			return out, err
		}
	}

	h := len(dist) / 2
	mit := c.mitigates()
	dst := probs
	if mit {
		dst = rawProbs
	}
	if c.Shots > 0 {
		// One multinomial sample over the accepted outcomes (a = 0, k) and
		// one outcome "rejected" that merges every a = 1 outcome: merging
		// categories of a multinomial leaves the joint law of the others
		// unchanged, and it saves the binomial draws of the discarded
		// shots.
		agg := s.agg[:h+1]
		copy(agg, dist[:h])
		agg[h] = 0
		for _, v := range dist[h:] {
			agg[h] += v
		}
		counts := sim.SampleCounts(agg, c.Shots, rng)
		out.pred, out.shots = decideCounts(dst, counts[:h], c.present)
		out.pacc = float64(out.shots) / float64(c.Shots)
		out.unused = unusedCounts(counts[:h], c.nClass, out.shots)
		if mit {
			// Mitigation needs the rejected shots by class value too: split
			// them by a second multinomial with the conditional law
			// P(1, k) / P(a = 1), drawn after the main sample (so the raw
			// decision keeps its draws). Given the merged count this is
			// exactly the law of the full multinomial.
			joint := make([]float64, len(dist))
			for k, n := range counts[:h] {
				joint[k] = float64(n)
			}
			if rej := counts[h]; rej > 0 {
				for k, n := range sim.SampleCounts(dist[h:], rej, rng) {
					joint[h+k] = float64(n)
				}
			}
			if err := c.mitigateInto(&out, probs, rawProbs, joint, p.qClass, 0, conf); err != nil {
				return out, err
			}
		}
		return out, nil
	}
	var acc float64
	for _, v := range dist[:h] {
		acc += v
	}
	out.pred = decideProbs(dst, dist, acc, floor, c.present)
	out.pacc = acc
	out.unused = unusedShare(dist[c.nClass:h], c.nClass, acc, floor)
	if mit {
		if err := c.mitigateInto(&out, probs, rawProbs, dist, p.qClass, floor, conf); err != nil {
			return out, err
		}
	}
	return out, nil
}

// mitigateInto moves the raw decision of out into out.raw (its
// probabilities are in rawProbs) and replaces it by the decision on the
// readout-mitigated joint distribution of joint (probabilities or counts,
// layout a*2^q + k), writing P(k | acc) into probs. floor is the bound at
// or below which the mitigated P(a = 0) counts as nothing accepted. conf
// holds the row's confusion matrices (on a device), nil for the
// classifier's (confusion).
func (c *Classifier) mitigateInto(out *outcome, probs, rawProbs, joint []float64, q int, floor float64, conf []Confusion) error {
	if conf == nil {
		var err error
		if conf, err = c.confusion(q); err != nil {
			return err
		}
	}
	pm, err := MitigateReadout(joint, conf)
	if err != nil {
		return err
	}
	out.raw = &RawDetail{Pred: out.pred, PAcc: out.pacc, Probs: rawProbs, Unused: out.unused}
	h := len(pm) / 2
	var acc float64
	for _, v := range pm[:h] {
		acc += v
	}
	out.pred = decideProbs(probs, pm, acc, floor, c.present)
	out.pacc = acc
	out.unused = unusedShare(pm[c.nClass:h], c.nClass, acc, floor)
	return nil
}

// unusedShare returns the share of the accepted probability acc on the
// unused class-register values, whose probabilities are extra (the
// entries k >= nClass of the accepted outcomes): 0 if there are none,
// NaN when acc is at or below floor (nothing accepted).
func unusedShare(extra []float64, nClass int, acc, floor float64) float64 {
	if acc <= floor {
		return math.NaN()
	}
	var u float64
	for _, v := range extra {
		u += v
	}
	return u / acc
}

// unusedCounts is unusedShare for the accepted counts (len 2^q) and N_acc.
func unusedCounts(acc []int, nClass, nacc int) float64 {
	if nacc == 0 {
		return math.NaN()
	}
	u := 0
	for _, n := range acc[nClass:] {
		u += n
	}
	return float64(u) / float64(nacc)
}

// eps is the machine epsilon of float64.
const eps = 0x1p-52

// rows returns the unit training vectors as row views.
func (c *Classifier) rows(s *scratch) [][]float64 {
	if cap(s.train) < c.n {
		s.train = make([][]float64, 0, c.n)
	}
	s.train = s.train[:0]
	for i := range c.n {
		s.train = append(s.train, c.unit[i*c.d:(i+1)*c.d:(i+1)*c.d])
	}
	return s.train
}

// channels applies the closed-form models of ModeNoisy to dist: ancilla
// dephasing and global depolarizing (which commute: each maps the uniform
// distribution to itself), then the readout error of Noise or of Channels
// (Validate allows only one).
func (c *Classifier) channels(dist []float64) ([]float64, error) {
	var err error
	ch := c.Channels
	if ch.AncillaDephasing != 0 {
		if dist, err = sim.AncillaDephasing(dist, ch.AncillaDephasing); err != nil {
			return nil, err
		}
	}
	if ch.GlobalDepolarizing != 0 {
		if dist, err = sim.GlobalDepolarizing(dist, ch.GlobalDepolarizing); err != nil {
			return nil, err
		}
	}
	ro := c.Noise.Readout
	if ro == [2]float64{} {
		ro = ch.Readout
	}
	if ro != [2]float64{} {
		if dist, err = sim.Readout(dist, ro[0], ro[1]); err != nil {
			return nil, err
		}
	}
	return dist, nil
}

// subsetJoint writes the closed-form P(a=0, c=k) and P(a=1, c=k) of the
// subset s.idx with weights w into s.p0 and s.p1 and returns P(a = 0).
func (c *Classifier) subsetJoint(s *scratch, w []float64) float64 {
	mass := s.p1 // reused: mass first, then P(a=1, c=k)
	clear(mass)
	clear(s.dot)
	for j, i := range s.idx {
		k := c.y[i]
		mass[k] += w[j]
		s.dot[k] += w[j] * floats.Dot(s.x, c.unit[i*c.d:(i+1)*c.d])
	}
	clear(s.p0)
	var sum float64
	for _, k := range c.present {
		s.p0[k] = math.Max(0, (mass[k]+s.dot[k])/2)
		s.p1[k] = math.Max(0, (mass[k]-s.dot[k])/2)
		sum += s.p0[k]
	}
	return sum
}

// decideProbs writes P(k | acc) = dist[k] / acc for the classes k < len(dst)
// and returns the tie-ruled argmax over the present classes. When acc is at
// or below floor nothing is accepted: present classes get NaN, absent ones
// 0, and the first present class is returned.
func decideProbs(dst, dist []float64, acc, floor float64, present []int) int {
	clear(dst)
	if acc <= floor {
		for _, k := range present {
			dst[k] = math.NaN()
		}
		return present[0]
	}
	for k := range dst {
		dst[k] = dist[k] / acc
	}
	return argmax(dst, present)
}

// decideCounts turns the sampled counts of the accepted outcomes (a = 0,
// class-register value k; len 2^q) into estimates counts_k / N_acc in dst
// (len nClass) and returns the prediction and N_acc. Values k >= nClass
// count in N_acc but for no class. The prediction is the present class with
// the most accepted shots, an exact tie going to the earlier class; with
// N_acc = 0 it is the first present class, present classes get NaN and
// absent ones 0.
func decideCounts(dst []float64, acc []int, present []int) (pred, nacc int) {
	for _, n := range acc {
		nacc += n
	}
	clear(dst)
	if nacc == 0 {
		for _, k := range present {
			dst[k] = math.NaN()
		}
		return present[0], 0
	}
	for k := range dst {
		dst[k] = float64(acc[k]) / float64(nacc)
	}
	pred = present[0]
	for _, k := range present[1:] {
		if acc[k] > acc[pred] {
			pred = k
		}
	}
	return pred, nacc
}

// subsetAlloc splits K rows over the present classes as equally as
// possible: one row per class in class order, round after round, skipping
// classes that are exhausted, until K rows are allotted. So the remainder
// goes to the earlier classes and a small class's shortfall is spread over
// the others. It needs len(present) <= K <= sum(count).
func subsetAlloc(K int, count, present []int) []int {
	alloc := make([]int, len(count))
	for left := K; left > 0; {
		for _, k := range present {
			if left > 0 && alloc[k] < count[k] {
				alloc[k]++
				left--
			}
		}
	}
	return alloc
}

// drawSubset draws alloc[k] training rows of every present class k without
// replacement (a partial Fisher-Yates shuffle of the class's members, class
// by class in class order) and leaves their positions, ascending, in s.idx,
// their rows in s.train and labels in s.ysub.
func (c *Classifier) drawSubset(s *scratch, alloc []int, rng *rand.Rand) {
	s.idx = s.idx[:0]
	for _, k := range c.present {
		pool := s.pool[:len(c.members[k])]
		copy(pool, c.members[k])
		for j := range alloc[k] {
			r := j + rng.IntN(len(pool)-j)
			pool[j], pool[r] = pool[r], pool[j]
		}
		s.idx = append(s.idx, pool[:alloc[k]]...)
	}
	slices.Sort(s.idx)
	s.train, s.ysub = s.train[:0], s.ysub[:0]
	for _, i := range s.idx {
		s.train = append(s.train, c.unit[i*c.d:(i+1)*c.d:(i+1)*c.d])
		s.ysub = append(s.ysub, c.y[i])
	}
}

// rowRand returns the generator of the test row at position pos: a PCG
// seeded with rowSeeds(seed, pos).
func rowRand(seed uint64, pos int) *rand.Rand {
	return rand.New(rand.NewPCG(rowSeeds(seed, pos)))
}

// rowSeeds returns the two PCG seeds of the test row at position pos,
// hashed from the task seed and pos with the SplitMix64 finaliser (Steele,
// Lea & Flood, "Fast splittable pseudorandom number generators", OOPSLA
// 2014; the two salts are the first two words of the SHA-512 initial hash
// value, FIPS 180-4, used as arbitrary constants), so that rows draw
// independent streams that do not depend on which rows ran before or on
// scheduling.
func rowSeeds(seed uint64, pos int) (uint64, uint64) {
	h := mix64(seed ^ mix64(uint64(pos)^0x6a09e667f3bcc908))
	return h, mix64(h ^ 0xbb67ae8584caa73b)
}

// mix64 is the SplitMix64 output function (increment, then finaliser).
func mix64(z uint64) uint64 {
	z += 0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}
