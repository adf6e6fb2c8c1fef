package modelkit

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// KeyError is a problem with one key of a model table. Key is the key as
// written in the table ("C", or "noise.readout" for a key of the noise
// sub-table).
type KeyError struct {
	Key string
	Err error
}

func (e *KeyError) Error() string { return e.Key + ": " + e.Err.Error() }
func (e *KeyError) Unwrap() error { return e.Err }

func keyErr(key, format string, args ...any) error {
	return &KeyError{Key: key, Err: fmt.Errorf(format, args...)}
}

// params reads typed values from a model table and remembers which keys
// were used, so that unknown keys can be reported.
type params struct {
	m    map[string]any
	used map[string]bool
	err  error
}

func newParams(m map[string]any) *params {
	return &params{m: m, used: map[string]bool{"kind": true, "name": true}}
}

func (p *params) fail(key, format string, args ...any) {
	if p.err == nil {
		p.err = keyErr(key, format, args...)
	}
}

func (p *params) has(key string) bool { _, ok := p.m[key]; return ok }

func (p *params) str(key, def string) string {
	p.used[key] = true
	v, ok := p.m[key]
	if !ok {
		return def
	}
	s, ok := v.(string)
	if !ok {
		p.fail(key, "want a string, got %v", v)
		return def
	}
	return s
}

func (p *params) integer(key string, def int) int {
	p.used[key] = true
	v, ok := p.m[key]
	if !ok {
		return def
	}
	i, ok := v.(int64)
	if !ok {
		p.fail(key, "want an integer, got %v", v)
		return def
	}
	if i > math.MaxInt32 || i < math.MinInt32 {
		p.fail(key, "integer %d out of range", i)
		return def
	}
	return int(i)
}

func (p *params) number(key string, def float64) float64 {
	p.used[key] = true
	v, ok := p.m[key]
	if !ok {
		return def
	}
	switch x := v.(type) {
	case int64:
		return float64(x)
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			p.fail(key, "want a finite number, got %v", x)
			return def
		}
		return x
	}
	p.fail(key, "want a number, got %v", v)
	return def
}

func (p *params) boolean(key string, def bool) bool {
	p.used[key] = true
	v, ok := p.m[key]
	if !ok {
		return def
	}
	b, ok := v.(bool)
	if !ok {
		p.fail(key, "want true or false, got %v", v)
		return def
	}
	return b
}

// table returns a sub-table (e.g. noise = {...}).
func (p *params) table(key string) map[string]any {
	p.used[key] = true
	v, ok := p.m[key]
	if !ok {
		return nil
	}
	t, ok := v.(map[string]any)
	if !ok {
		p.fail(key, "want a table, got %v", v)
		return nil
	}
	return t
}

// finish reports the first error or the first unknown key (sorted).
func (p *params) finish(kind string) error {
	if p.err != nil {
		return p.err
	}
	var unknown []string
	for k := range p.m {
		if !p.used[k] {
			unknown = append(unknown, k)
		}
	}
	if len(unknown) > 0 {
		sort.Strings(unknown)
		var allowed []string
		for k := range p.used {
			allowed = append(allowed, k)
		}
		sort.Strings(allowed)
		return keyErr(unknown[0], "unknown key for kind %q (allowed: %s)", kind, strings.Join(allowed, ", "))
	}
	return nil
}

// stringList reads an array of strings.
func stringList(p *params, key string) []string {
	p.used[key] = true
	v, ok := p.m[key]
	if !ok {
		return nil
	}
	arr, ok := v.([]any)
	if !ok {
		p.fail(key, "want an array of strings, got %v", v)
		return nil
	}
	out := make([]string, len(arr))
	for i, x := range arr {
		s, ok := x.(string)
		if !ok {
			p.fail(key, "want an array of strings, element %d is %v", i+1, x)
			return nil
		}
		out[i] = s
	}
	return out
}
