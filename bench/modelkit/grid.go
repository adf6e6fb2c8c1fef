package modelkit

import (
	"fmt"
	"slices"
	"strings"

	"fringe/datasets"
)

// Grid is the search space of a tuned model: every key of its [[model]]
// table given a list of values, and the model's own `pipelines` (steps
// applied after the run's pipeline, fitted on the model's training part).
// Points are the Cartesian product in grid order: the pipeline dimension
// first (outermost), then the keys in sorted order (Go's sort.Strings,
// which puts "C" before "gamma" as scikit-learn's ParameterGrid does), the
// first dimension varying slowest, each dimension's values as written.
// Keys sort in their current spelling (offset, vote, simulator: see
// Respellings), whichever spelling the spec used; where a name differs
// from scikit-learn's (offset, its coef0) the order can differ from
// ParameterGrid's.
// Ties of the inner score go to the first point in this order.
type Grid struct {
	Keys   []string // tuned dimensions in grid order ("pipeline" for the model's pipelines)
	Points []Point
}

// Point is one configuration of a Grid.
type Point struct {
	Values []string // per key of Grid.Keys, the value as written
	Spec   Spec     // the configuration as an untuned model (Spec.Pipeline set)
}

// Label describes a point: "C=1 gamma=scale" (the values of the tuned
// keys, as written).
func (g *Grid) Label(i int) string {
	parts := make([]string, len(g.Keys))
	for k, key := range g.Keys {
		parts[k] = key + "=" + g.Points[i].Values[k]
	}
	return strings.Join(parts, " ")
}

// Configs returns the model's configurations: the grid's points, or the
// model itself when it is not tuned.
func (m Spec) Configs() []Spec {
	if m.Grid == nil {
		return []Spec{m}
	}
	out := make([]Spec, len(m.Grid.Points))
	for i, p := range m.Grid.Points {
		out[i] = p.Spec
	}
	return out
}

// untunable are the keys that take a single value: a list of several is
// an error, not a grid.
var untunable = map[string]bool{"device": true, "mitigate": true, "calibration": true}

// listKeys are the keys whose value is a list even for one configuration.
var listKeys = map[string]map[string]bool{"command": {"run": true}}

// Parse validates one [[model]] table (as decoded from TOML: strings,
// int64, float64, bool, []any and map[string]any values) and returns its
// Spec. A key given a list of values makes the model tuned (Spec.Grid):
// every point is validated as a model of its own, so a wrong value names
// its key and position. The model's own `pipelines` list (pipeline
// strings) adds the pipeline dimension; with one entry it only adds steps.
// Errors about one key are a *KeyError naming the key (for a noise key,
// "noise.<key>"); the spec parser adds the file, line and table.
//
// Old spellings of renamed keys and values (Respellings) are read as the
// new ones and listed in Spec.Deprecated; an error about such a key names
// it as written. Both spellings of one key in a table are an error.
func Parse(m map[string]any) (Spec, error) {
	m, written, deprecated, err := respell(m)
	if err != nil {
		return Spec{}, err
	}
	ms, err := parseTable(m)
	if ke, ok := err.(*KeyError); ok && written[ke.Key] != "" {
		err = &KeyError{Key: written[ke.Key], Err: ke.Err}
	}
	if err != nil {
		return ms, err
	}
	ms.Deprecated = deprecated
	return ms, nil
}

// parseTable is Parse of a table in the current spellings.
func parseTable(m map[string]any) (Spec, error) {
	ms, err := parse(m)
	if err != nil {
		return ms, err
	}
	if v, ok := m["label"]; ok {
		l, isStr := v.(string)
		if !isStr {
			return Spec{}, keyErr("label", "want a string (the model's label in summary.tex and summary.md), got %v", v)
		}
		if strings.TrimSpace(l) == "" {
			return Spec{}, keyErr("label", "an empty label (leave the key out to show the model's name)")
		}
		ms.Label = l
	}
	return ms, nil
}

// parse is Parse without the model's label.
func parse(m map[string]any) (Spec, error) {
	kind, _ := m["kind"].(string)
	base := map[string]any{}
	var keys []string
	lists := map[string][]any{}
	var pipes []string
	for k, v := range m {
		if k == "label" {
			continue // read by Parse; not a parameter
		}
		if k == "pipelines" {
			arr, ok := v.([]any)
			if !ok {
				return Spec{}, keyErr(k, "want a list of pipelines, got %v", v)
			}
			if len(arr) == 0 {
				return Spec{}, keyErr(k, "an empty list of pipelines")
			}
			for i, x := range arr {
				s, ok := x.(string)
				if !ok {
					return Spec{}, keyErr(k, "value %d: want a pipeline string, got %v", i+1, x)
				}
				if _, err := datasets.ParsePipeline(s); err != nil {
					return Spec{}, keyErr(k, "value %d: %v", i+1, err)
				}
				if slices.Contains(pipes, s) {
					return Spec{}, keyErr(k, "pipeline %q appears twice", s)
				}
				pipes = append(pipes, s)
			}
			continue
		}
		if arr, ok := v.([]any); ok && !listKeys[kind][k] && k != "kind" && k != "name" {
			if len(arr) == 0 {
				return Spec{}, keyErr(k, "an empty list of values (give one value, or several to tune the model)")
			}
			if len(arr) > 1 && untunable[k] {
				return Spec{}, keyErr(k, "takes one value; devices and their calibration are compared, not tuned: give each its own [[model]] table")
			}
			if len(arr) > 1 {
				keys = append(keys, k)
				lists[k] = arr
				continue
			}
			v = arr[0] // a list of one value is that value
		}
		base[k] = v
	}
	slices.Sort(keys)
	if len(keys) == 0 && len(pipes) <= 1 {
		ms, err := parseOne(base)
		if err != nil {
			return ms, err
		}
		if len(pipes) == 1 && pipes[0] != "raw" {
			ms.Pipeline = pipes[0]
			ms.Params["pipeline"] = pipes[0]
			if _, named := m["name"]; !named {
				ms.Name += "-then-" + pipes[0]
			}
		}
		return ms, nil
	}
	g := &Grid{}
	if len(pipes) > 1 {
		g.Keys = append(g.Keys, "pipeline")
	}
	g.Keys = append(g.Keys, keys...)
	if len(pipes) == 0 {
		pipes = []string{""}
	}
	var points []Point
	var walk func(d int, table map[string]any, vals []string, pipe string) error
	walk = func(d int, table map[string]any, vals []string, pipe string) error {
		if d == len(keys) {
			ms, err := parseOne(table)
			if err != nil {
				return err
			}
			if pipe != "raw" {
				ms.Pipeline = pipe
			}
			points = append(points, Point{Values: slices.Clone(vals), Spec: ms})
			return nil
		}
		k := keys[d]
		for i, v := range lists[k] {
			if _, nested := v.([]any); nested {
				return keyErr(k, "value %d: a list inside the list of values", i+1)
			}
			t := make(map[string]any, len(table)+1)
			for kk, vv := range table {
				t[kk] = vv
			}
			t[k] = v
			if err := walk(d+1, t, append(vals, valueText(v)), pipe); err != nil {
				var ke *KeyError
				if e, ok := err.(*KeyError); ok && e.Key == k {
					ke = e
					return keyErr(k, "value %d (%s): %v", i+1, valueText(v), ke.Err)
				}
				return err
			}
		}
		return nil
	}
	for _, pipe := range pipes {
		var vals []string
		if len(g.Keys) > 0 && g.Keys[0] == "pipeline" {
			vals = []string{pipeText(pipe)}
		}
		if err := walk(0, base, vals, pipe); err != nil {
			return Spec{}, err
		}
	}
	g.Points = points
	ms := points[0].Spec
	ms.Grid = g
	params := map[string]any{}
	for k, v := range ms.Params {
		params[k] = v
	}
	params["tuned"] = strings.Join(g.Keys, ",")
	ms.Params = params
	if name, _ := m["name"].(string); name != "" {
		ms.Name = name
	} else {
		label := kind
		if kind == "svm" && !slices.Contains(keys, "kernel") {
			label += "-" + fmt.Sprint(ms.Params["kernel"])
		}
		ms.Name = label + "-tuned-" + strings.Join(g.Keys, "-")
	}
	return ms, nil
}

// valueText writes a grid value as in the spec.
func valueText(v any) string {
	switch x := v.(type) {
	case string:
		return x
	case float64:
		return fmtNum(x)
	}
	return fmt.Sprint(v)
}

func pipeText(p string) string {
	if p == "" {
		return "raw"
	}
	return p
}
