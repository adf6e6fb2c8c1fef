package baselines

import (
	"fmt"
	"math"
)

// smoOpts are the settings of one two-class solve.
type smoOpts struct {
	c       float64 // box constraint
	eps     float64 // stopping tolerance on m(a) − M(a)
	maxIter int     // limit on two-variable updates
	shrink  bool    // shrink the active set (Chang & Lin 2011, section 5.1)
	// v0, with a warm start, is v = −y∘∇ at the starting point (in the
	// order the cache's points were given); nil computes it from kernel
	// rows.
	v0 []float64
}

// smoResult is the solution of one two-class dual problem.
type smoResult struct {
	alpha     []float64 // multipliers, in the order the cache's points were given
	rho       float64
	iter      int       // two-variable updates made
	gap       float64   // m(a) − M(a) over all variables at the end
	shrinks   int       // shrinking passes
	minActive int       // smallest active set
	quad      float64   // aᵀQa at the solution
	sum       float64   // Σ a_t
	v         []float64 // −y_t ∇_t at the solution, in the order of alpha
}

// shrinkEvery is the number of iterations between two shrinking passes for
// tasks of at least that many variables (n between passes otherwise), as
// in LIBSVM (Chang & Lin 2011, section 5.1: min(n, 1000)).
const shrinkEvery = 1000

// solveSMO solves the C-SVC dual for labels y (±1, in the order the cache's
// points were given) over the Gram matrix of cache by SMO with the
// second-order working-set selection of Fan, Chen & Lin (2005), and returns
// the multipliers and the bias ρ. alpha0, when not nil, is a feasible
// starting point (0 ≤ a_t ≤ C, Σ y_t a_t = 0; a warm start), with its v in
// o.v0 if known (otherwise computed from the rows of the non-zero
// multipliers); nil starts from a = 0. It returns an error wrapping ErrNotConverged after maxIter
// updates without meeting m(a) − M(a) ≤ eps.
//
// It keeps v_t = −y_t ∇_t (the quantity both selections compare) rather than
// the gradient ∇ = Qa − e itself: since y_t = ±1, v_t − s and −y_t(∇_t + y_t s)
// are the same floating-point number, so the steps are exactly those of the
// textbook form. Membership of I_up and I_low is kept in two flag slices,
// changed only for the two updated variables, and the search for the next
// i runs in the same pass as the gradient update.
//
// Shrinking (o.shrink), after LIBSVM (Chang & Lin, "LIBSVM: a library for
// support vector machines", ACM TIST 2 (2011) 27, section 5.1): every
// min(n, 1000) iterations the variables that sit at a bound and whose v_t
// lies beyond the current violation interval on the side they cannot move
// to, that is
//
//	t ∈ I_up \ I_low  with  v_t < M(a),   or   t ∈ I_low \ I_up  with  v_t > m(a),
//
// are moved behind the active ones (positions are swapped in the cache
// too, so that kernel rows are computed over the active positions only);
// the iterations then select and update over the active set only. The
// gradient of the inactive variables is rebuilt from
//
//	v_t = y_t − w̄_t − Σ_{s free} a_s y_s K_ts,   w̄_t = Σ_{s: a_s = C} C y_s K_ts,
//
// with w̄ kept up to date over all variables whenever a multiplier reaches
// or leaves C (the inactive ones are at a bound, so they hold no free
// multiplier). The reconstruction happens once when m(a) − M(a) over the
// active set first falls to 10·eps (then the active set is rebuilt from all
// variables), and whenever the active set meets the stopping rule: then the
// rule is checked on all variables, and the solve only ends when it holds
// there; otherwise shrinking resumes at the next iteration. So the returned
// solution satisfies m(a) − M(a) ≤ eps over every variable, as without
// shrinking.
func solveSMO(cache *kernelCache, y, alpha0 []float64, o smoOpts) (smoResult, error) {
	n := len(y)
	c, eps := o.c, o.eps
	perm := cache.perm
	alpha := make([]float64, n) // position order, as all slices below
	yp := make([]float64, n)
	v := make([]float64, n) // −y_t ∇_t; ∇ = −e at a = 0
	up := make([]bool, n)   // t in I_up: y_t = +1, a_t < C or y_t = −1, a_t > 0
	low := make([]bool, n)  // t in I_low: y_t = +1, a_t > 0 or y_t = −1, a_t < C
	// wbar_t = Σ_{s: a_s = C} C y_s K_ts, needed once variables are set
	// aside and kept up to date from then on (updateBar). When the cache
	// holds the whole Gram matrix it is built at the first shrinking pass
	// (many solves end before one); otherwise it is kept from the start,
	// because the rows of the multipliers reaching C are in the cache just
	// then (they were a working pair), while building it later would
	// recompute evicted rows.
	var wbar []float64
	buildBar := func() {
		wbar = make([]float64, n)
		for s := range n {
			if alpha[s] < c {
				continue
			}
			ks := cache.row(s, n)
			cs := c * yp[s]
			for t, k := range ks {
				wbar[t] += cs * k
			}
		}
	}
	setFlags := func(t int) {
		if yp[t] > 0 {
			up[t], low[t] = alpha[t] < c, alpha[t] > 0
		} else {
			up[t], low[t] = alpha[t] > 0, alpha[t] < c
		}
	}
	for q, t := range perm {
		yp[q] = y[t]
		v[q] = y[t]
		if alpha0 != nil {
			alpha[q] = alpha0[t]
		}
	}
	switch {
	case alpha0 != nil && o.v0 != nil:
		for q, t := range perm {
			v[q] = o.v0[t]
		}
	case alpha0 != nil:
		// v_t = y_t − Σ_s a_s y_s K_ts over the non-zero multipliers.
		for s := range n {
			if alpha[s] <= 0 {
				continue
			}
			ks := cache.row(s, n)
			as := alpha[s] * yp[s]
			for t, k := range ks {
				v[t] -= as * k
			}
		}
	}
	for t := range n {
		setFlags(t)
	}
	if o.shrink && !cache.full {
		buildBar()
	}
	diag := cache.diag[:n] // swapped in place by cache.swap

	swap := func(a, b int) {
		alpha[a], alpha[b] = alpha[b], alpha[a]
		yp[a], yp[b] = yp[b], yp[a]
		v[a], v[b] = v[b], v[a]
		up[a], up[b] = up[b], up[a]
		low[a], low[b] = low[b], low[a]
		wbar[a], wbar[b] = wbar[b], wbar[a]
		cache.swap(a, b)
	}
	// reconstruct sets v_t for the inactive positions [active, n).
	reconstruct := func(active int) {
		if active == n {
			return
		}
		var nfree int
		for s := range active {
			if alpha[s] > 0 && alpha[s] < c {
				nfree++
			}
		}
		for t := active; t < n; t++ {
			v[t] = yp[t] - wbar[t]
		}
		// Either one row of length active per inactive variable, or one
		// full row per free variable (rows the solver has often just
		// used, so likely cached): the first when the second needs more
		// than twice its entries.
		if int64(nfree)*int64(n) > 2*int64(active)*int64(n-active) {
			for t := active; t < n; t++ {
				kt := cache.row(t, active)
				var sum float64
				for s, k := range kt {
					if alpha[s] > 0 && alpha[s] < c {
						sum += alpha[s] * yp[s] * k
					}
				}
				v[t] -= sum
			}
			return
		}
		for s := range active {
			if !(alpha[s] > 0 && alpha[s] < c) {
				continue
			}
			ks := cache.row(s, n)[active:]
			as := alpha[s] * yp[s]
			vt := v[active:]
			for t, k := range ks {
				vt[t] -= as * k
			}
		}
	}
	// scanUp returns m(a) and the last position attaining it over [0, active).
	scanUp := func(active int) (float64, int) {
		gmax, i := math.Inf(-1), -1
		for t, vt := range v[:active] {
			if up[t] && vt >= gmax {
				gmax, i = vt, t
			}
		}
		return gmax, i
	}

	res := smoResult{minActive: n}
	active := n
	counter := min(n, shrinkEvery) + 1
	unshrunk := false
	// shrinkPass drops bounded variables that cannot take part in a
	// violating pair (see above) from the active set.
	shrinkPass := func() {
		res.shrinks++
		if wbar == nil {
			buildBar()
		}
		bounds := func(to int) (float64, float64) {
			m, M := math.Inf(-1), math.Inf(1)
			for t, vt := range v[:to] {
				if up[t] && vt > m {
					m = vt
				}
				if low[t] && vt < M {
					M = vt
				}
			}
			return m, M
		}
		m, M := bounds(active)
		if !unshrunk && m-M <= 10*eps {
			unshrunk = true
			reconstruct(active)
			active = n
		}
		out := func(t int) bool {
			return up[t] && !low[t] && v[t] < M || low[t] && !up[t] && v[t] > m
		}
		for t := 0; t < active; t++ {
			if !out(t) {
				continue
			}
			active--
			for active > t {
				if !out(active) {
					swap(t, active)
					break
				}
				active--
			}
		}
		res.minActive = min(res.minActive, active)
	}

	gmax, i := scanUp(active)
	for {
		if o.shrink {
			counter--
			if counter == 0 {
				counter = min(n, shrinkEvery)
				shrinkPass()
				gmax, i = scanUp(active)
			}
		}
		// j minimises −b_it²/a_it over t in I_low with v_t < m(a), where
		// b_it = m(a) − v_t and a_it = K_ii + K_tt − 2K_it (Fan, Chen & Lin
		// 2005, second-order selection); vmin = M(a).
		vmin, j := math.Inf(1), -1
		var ki []float64
		if i >= 0 {
			ki = cache.row(i, active)[:active]
			// best = −objMin. A candidate can only win if b²/a ≥ best, so
			// b² < best·a·(1 − 1e-12) rules it out without the division:
			// the slack is far above the rounding of either side (a few
			// units of 2^-53), so every candidate the division would
			// accept passes, and the selection (ties included) is that of
			// the plain loop.
			objMin, best := math.Inf(1), 0.0
			di := diag[i]
			diag := diag[:active]
			low := low[:active]
			for t, vt := range v[:active] {
				if !low[t] {
					continue
				}
				if vt < vmin {
					vmin = vt
				}
				if b := gmax - vt; b > 0 {
					a := di + diag[t] - 2*ki[t]
					if a <= 0 {
						a = tau
					}
					if b*b < best*a*(1-1e-12) {
						continue
					}
					if obj := -b * b / a; obj <= objMin {
						objMin, j = obj, t
						best = -obj
					}
				}
			}
		}
		gap := gmax - vmin // M(a) = vmin
		if i < 0 {
			gap = math.Inf(-1)
		}
		if gap <= eps || j < 0 {
			if active < n {
				// Optimal on the active set: check all variables before
				// stopping, and shrink again after the next iteration.
				reconstruct(active)
				active = n
				gmax, i = scanUp(active)
				counter = 2
				continue
			}
			res.gap = gap
			break
		}
		if res.iter >= o.maxIter {
			return res, fmt.Errorf("%d iterations, violation m-M = %.3g > tol %.3g: %w", res.iter, gap, eps, ErrNotConverged)
		}
		kj := cache.row(j, active)[:active] // ki stays valid: the cache keeps the two most recent rows
		res.iter++
		pi, pj := i, j
		oldI, oldJ := alpha[i], alpha[j]
		updatePair(alpha, -yp[i]*v[i], -yp[j]*v[j], yp, i, j, diag[i]+diag[j]-2*ki[j], c)
		setFlags(i)
		setFlags(j)
		// ∇_t += Q_ti Δa_i + Q_tj Δa_j with Q_ts = y_t y_s K_ts, so
		// v_t −= y_i Δa_i K_ti + y_j Δa_j K_tj; then the next i.
		ci := yp[i] * (alpha[i] - oldI)
		cj := yp[j] * (alpha[j] - oldJ)
		gmax, i = math.Inf(-1), -1
		va := v[:active]
		up, ki, kj := up[:len(va)], ki[:len(va)], kj[:len(va)]
		for t, vt := range va {
			vt -= ci*ki[t] + cj*kj[t]
			va[t] = vt
			if up[t] && vt >= gmax {
				gmax, i = vt, t
			}
		}
		if wbar != nil {
			updateBar(cache, wbar, yp, c, oldI, alpha[pi], pi, n)
			updateBar(cache, wbar, yp, c, oldJ, alpha[pj], pj, n)
		}
	}
	g := make([]float64, n)
	for t := range n {
		g[t] = -yp[t] * v[t]
	}
	res.rho = bias(alpha, g, yp, c)
	for t, a := range alpha {
		if a > 0 {
			res.quad += a * (g[t] + 1) // (Qa)_t = ∇_t + 1
			res.sum += a
		}
	}
	res.alpha = make([]float64, n)
	res.v = make([]float64, n)
	for q, t := range perm {
		res.alpha[t] = alpha[q]
		res.v[t] = v[q]
	}
	return res, nil
}

// updateBar adds ±C y_s K_ts to wbar_t for every t when a_s reaches or
// leaves C (old → now).
func updateBar(cache *kernelCache, wbar, yp []float64, c, old, now float64, s, n int) {
	was, is := old >= c, now >= c
	if was == is {
		return
	}
	cs := c * yp[s]
	if was {
		cs = -cs
	}
	ks := cache.row(s, n)
	for t, k := range ks {
		wbar[t] += cs * k
	}
}

// updatePair minimises the dual objective over a_i and a_j with the others
// fixed, keeping y_i a_i + y_j a_j constant and both in [0, c]; gi and gj are
// the gradient entries ∇_i and ∇_j, quad is K_ii + K_jj − 2K_ij (replaced by
// tau if not positive). The clipping follows LIBSVM's Solver::Solve for
// equal upper bounds.
func updatePair(alpha []float64, gi, gj float64, y []float64, i, j int, quad, c float64) {
	if quad <= 0 {
		quad = tau
	}
	if y[i] != y[j] {
		delta := (-gi - gj) / quad
		diff := alpha[i] - alpha[j]
		alpha[i] += delta
		alpha[j] += delta
		if diff > 0 {
			if alpha[j] < 0 {
				alpha[j], alpha[i] = 0, diff
			}
		} else if alpha[i] < 0 {
			alpha[i], alpha[j] = 0, -diff
		}
		if diff > 0 {
			if alpha[i] > c {
				alpha[i], alpha[j] = c, c-diff
			}
		} else if alpha[j] > c {
			alpha[j], alpha[i] = c, c+diff
		}
		return
	}
	delta := (gi - gj) / quad
	sum := alpha[i] + alpha[j]
	alpha[i] -= delta
	alpha[j] += delta
	if sum > c {
		if alpha[i] > c {
			alpha[i], alpha[j] = c, sum-c
		}
	} else if alpha[j] < 0 {
		alpha[j], alpha[i] = 0, sum
	}
	if sum > c {
		if alpha[j] > c {
			alpha[j], alpha[i] = c, sum-c
		}
	} else if alpha[i] < 0 {
		alpha[i], alpha[j] = 0, sum
	}
}

// bias returns ρ as LIBSVM computes it: the mean of y_t g_t over free
// multipliers (0 < a_t < c), or, with none free, the midpoint of
// [max over the lower-bound set, min over the upper-bound set].
func bias(alpha, g, y []float64, c float64) float64 {
	ub, lb := math.Inf(1), math.Inf(-1)
	var sum float64
	var free int
	for t, yt := range y {
		yg := yt * g[t]
		switch {
		case alpha[t] >= c:
			if yt < 0 {
				ub = min(ub, yg)
			} else {
				lb = max(lb, yg)
			}
		case alpha[t] <= 0:
			if yt > 0 {
				ub = min(ub, yg)
			} else {
				lb = max(lb, yg)
			}
		default:
			free++
			sum += yg
		}
	}
	if free > 0 {
		return sum / float64(free)
	}
	return (ub + lb) / 2
}
