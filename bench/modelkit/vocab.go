package modelkit

import (
	"fmt"
	"strconv"
	"strings"

	"fringe/baselines"
)

// GammaInverseVariance is the value of an SVM's gamma key that derives the
// kernel width from the training part of each split:
//
//	gamma = 1 / (d · Var(X))
//
// where X is the n×d training matrix after the pipeline and Var the
// population variance of all its n·d entries (the mean of squared
// deviations from their common mean); a zero variance gives gamma = 1. It
// is the default of the rbf and poly kernels.
const GammaInverseVariance = "inverse-variance"

// The vote rules of a k-NN model (key vote; default VoteEqual). With the
// k nearest training rows at distances d_1..d_k (the model's metric), the
// predicted class is the one with the largest sum of votes, ties to the
// first class.
const (
	// VoteEqual gives each of the k neighbours one vote.
	VoteEqual = "equal"
	// VoteInverseDistance gives a neighbour at distance d the vote 1/d;
	// when some neighbours lie at distance 0, they alone vote, one vote
	// each.
	VoteInverseDistance = "inverse-distance"
)

// parseVote returns the weighting of a vote rule (case and surrounding
// space ignored) and its name as written in labels and Params.
func parseVote(s string) (baselines.Weighting, string, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case VoteEqual:
		return baselines.Uniform, VoteEqual, nil
	case VoteInverseDistance:
		return baselines.Distance, VoteInverseDistance, nil
	}
	return 0, "", fmt.Errorf("unknown vote %q (want %s or %s)", s, VoteEqual, VoteInverseDistance)
}

// Respelling is a key of a model kind, or some of its values, renamed in
// this release. Parse still reads the old spelling, maps it to the new
// one and reports it in Spec.Deprecated; the old spellings are read for
// this release only. A table that gives a key in both spellings is an
// error naming both.
type Respelling struct {
	Kind     string      // the model kind whose key it is
	Old, New string      // the key's old and new spelling (equal when only values were renamed)
	Values   [][2]string // renamed values: {old, new}
	Fold     bool        // old values match ignoring case and surrounding space (as the old parser did)
}

// Respellings lists the renamed keys and values. The old names were one
// reference library's vocabulary; the new ones say what the option does.
var Respellings = []Respelling{
	{Kind: "svm", Old: "gamma", New: "gamma", Values: [][2]string{{"scale", GammaInverseVariance}}},
	{Kind: "svm", Old: "coef0", New: "offset"},
	{Kind: "knn", Old: "weights", New: "vote", Values: [][2]string{{"uniform", VoteEqual}, {"distance", VoteInverseDistance}}, Fold: true},
	{Kind: "interference", Old: "method", New: "simulator", Values: [][2]string{{"statevector", "state-vector"}, {"density", "density-matrix"}}},
}

// Deprecation is an old spelling Parse read in a model table.
type Deprecation struct {
	Key     string // the key as written in the table ("weights")
	Message string // what was written and what to write instead
}

// Respell returns the model table m with every old spelling of
// Respellings replaced by the new one (m itself when there is none). A
// table that gives both spellings of a key is returned unchanged: Parse
// refuses it. The canonical form of a spec uses it, so that a spec gets
// the same run identity in either spelling.
func Respell(m map[string]any) map[string]any {
	out, _, _, err := respell(m)
	if err != nil {
		return m
	}
	return out
}

// respell is Respell that also returns, by new key, the key as written
// (for keys written in their old spelling), the deprecations in the order
// of Respellings, and the error of a key given in both spellings.
func respell(m map[string]any) (out map[string]any, written map[string]string, deps []Deprecation, err error) {
	kind, _ := m["kind"].(string)
	out = m
	copied := false
	for _, r := range Respellings {
		if r.Kind != kind {
			continue
		}
		key := r.Old
		v, ok := m[r.Old]
		if r.Old != r.New {
			if _, both := m[r.New]; both && ok {
				return m, nil, nil, keyErr(r.Old, "both %s and its old spelling %s are given; keep %s only", r.New, r.Old, r.New)
			}
			if !ok {
				key = r.New
				v, ok = m[r.New]
			}
		}
		if !ok {
			continue
		}
		nv, changed := r.respellValue(v)
		if key == r.New && !changed {
			continue
		}
		if !copied {
			out = make(map[string]any, len(m))
			for k, x := range m {
				out[k] = x
			}
			copied = true
		}
		delete(out, key)
		out[r.New] = nv
		if key != r.New {
			if written == nil {
				written = map[string]string{}
			}
			written[r.New] = key
		}
		deps = append(deps, Deprecation{Key: key, Message: fmt.Sprintf("%s = %s is deprecated and will not be read by the next release; write %s = %s",
			key, tomlText(v), r.New, tomlText(nv))})
	}
	return out, written, deps, nil
}

// respellValue maps the old values of r in v (a string, or a list of
// values to tune over) to the new ones; changed reports whether any was.
func (r Respelling) respellValue(v any) (nv any, changed bool) {
	one := func(x any) (any, bool) {
		s, ok := x.(string)
		if !ok {
			return x, false
		}
		t := s
		if r.Fold {
			t = strings.ToLower(strings.TrimSpace(s))
		}
		for _, p := range r.Values {
			if t == p[0] {
				return p[1], true
			}
		}
		return x, false
	}
	arr, ok := v.([]any)
	if !ok {
		return one(v)
	}
	out := make([]any, len(arr))
	for i, x := range arr {
		var c bool
		out[i], c = one(x)
		changed = changed || c
	}
	if !changed {
		return v, false
	}
	return out, true
}

// tomlText writes a table value as TOML would spell it, for messages.
func tomlText(v any) string {
	switch x := v.(type) {
	case string:
		return strconv.Quote(x)
	case float64:
		t := strconv.FormatFloat(x, 'g', -1, 64)
		if !strings.ContainsAny(t, ".eIN") {
			t += ".0" // 1.0, not the integer 1
		}
		return t
	case int64:
		return strconv.FormatInt(x, 10)
	case bool:
		return strconv.FormatBool(x)
	case []any:
		parts := make([]string, len(x))
		for i, e := range x {
			parts[i] = tomlText(e)
		}
		return "[" + strings.Join(parts, ", ") + "]"
	}
	return fmt.Sprint(v)
}

// WrittenKey returns a key of the model's kind in its current spelling as
// the model's table wrote it: the old spelling when the table used that
// (see Deprecated), else key itself. Errors found after parsing (at plan
// time) name the key through it, so that its line is found.
func (m Spec) WrittenKey(key string) string {
	for _, d := range m.Deprecated {
		for _, r := range Respellings {
			if r.Kind == m.Kind && r.New == key && r.Old == d.Key {
				return d.Key
			}
		}
	}
	return key
}
