package spec

import (
	"strings"
	"testing"
)

// TestNoPipelinesWarning checks the decision for a spec without
// pipelines: it is accepted with pipeline raw and one warning naming the
// file and the key; an explicit list (raw included) has none.
func TestNoPipelinesWarning(t *testing.T) {
	base := "name = \"w\"\nseed = 1\ndatasets = [\"iris\"]\n%s[[model]]\nkind = \"knn\"\n"
	for _, c := range []struct {
		pipes string
		warn  bool
	}{
		{"", true},
		{"pipelines = []\n", true},
		{"pipelines = [\"raw\"]\n", false},
		{"pipelines = [\"std\", \"l2\"]\n", false},
	} {
		s, err := Parse("w.toml", []byte(strings.Replace(base, "%s", c.pipes, 1)))
		if err != nil {
			t.Fatal(err)
		}
		if !c.warn {
			if len(s.Warnings) != 0 {
				t.Errorf("%q: warnings %q", c.pipes, s.Warnings)
			}
			continue
		}
		if len(s.Pipelines) != 1 || s.Pipelines[0] != "raw" {
			t.Errorf("%q: pipelines %q, want [raw]", c.pipes, s.Pipelines)
		}
		if len(s.Warnings) != 1 || s.Warnings[0] != "w.toml: "+NoPipelinesWarning || !strings.Contains(s.Warnings[0], `pipelines = ["raw"]`) {
			t.Errorf("%q: warnings %q", c.pipes, s.Warnings)
		}
	}
}
