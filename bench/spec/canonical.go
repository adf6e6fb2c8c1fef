package spec

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"sort"
	"strconv"

	"github.com/BurntSushi/toml"

	"fringe/bench/modelkit"
)

// CanonicalSHA returns the hex SHA-256 of a spec's canonical form: the
// decoded TOML document written with sorted keys and exact numbers, so
// that comments, blank lines, key order and quoting do not change it while
// any value does. Model tables are written in the current spellings of
// their keys and values (modelkit.Respell), so that a spec that still uses
// an old spelling has the same identity as one that uses the new. Text
// that does not decode is hashed as it is.
func CanonicalSHA(src []byte) string { return canonicalSpecSHA(src, false) }

// CanonicalSHAWithoutSeed is CanonicalSHA of the spec without its
// top-level seed: two specs that differ only in their seed have the same
// value (used to tell a seed change from other changes in messages).
func CanonicalSHAWithoutSeed(src []byte) string { return canonicalSpecSHA(src, true) }

// canonicalSpecSHA is CanonicalSHA, optionally without the top-level
// seed (to tell a seed change from other changes in messages).
func canonicalSpecSHA(src []byte, dropSeed bool) string {
	var doc map[string]any
	var b bytes.Buffer
	if _, err := toml.NewDecoder(bytes.NewReader(src)).Decode(&doc); err != nil {
		b.WriteString("raw\x00")
		b.Write(src)
	} else {
		if dropSeed {
			delete(doc, "seed")
		}
		switch models := doc["model"].(type) {
		case []map[string]any:
			for i, m := range models {
				models[i] = modelkit.Respell(m)
			}
		case []any: // model = [{...}, ...]
			for i, m := range models {
				if t, ok := m.(map[string]any); ok {
					models[i] = modelkit.Respell(t)
				}
			}
		}
		b.WriteString("toml\x00")
		canonical(&b, doc)
	}
	sum := sha256.Sum256(b.Bytes())
	return hex.EncodeToString(sum[:])
}

// canonical writes a decoded TOML value in a canonical text form.
func canonical(b *bytes.Buffer, v any) {
	switch x := v.(type) {
	case map[string]any:
		keys := make([]string, 0, len(x))
		for k := range x {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		b.WriteByte('{')
		for _, k := range keys {
			b.WriteString(strconv.Quote(k))
			b.WriteByte(':')
			canonical(b, x[k])
			b.WriteByte(',')
		}
		b.WriteByte('}')
	case []map[string]any:
		b.WriteByte('[')
		for _, e := range x {
			canonical(b, e)
			b.WriteByte(',')
		}
		b.WriteByte(']')
	case []any:
		b.WriteByte('[')
		for _, e := range x {
			canonical(b, e)
			b.WriteByte(',')
		}
		b.WriteByte(']')
	case string:
		b.WriteString("s" + strconv.Quote(x))
	case int64:
		b.WriteString("i" + strconv.FormatInt(x, 10))
	case float64:
		b.WriteString("f" + strconv.FormatFloat(x, 'g', -1, 64))
	case bool:
		b.WriteString("b" + strconv.FormatBool(x))
	default:
		fmt.Fprintf(b, "%T(%v)", x, x)
	}
}
