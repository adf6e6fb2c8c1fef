package spec_test

import (
	"errors"
	"reflect"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/spec"
)

// respellOld uses every old spelling of a renamed model key or value;
// respellNew is the same spec in the current spellings.
const respellOld = `name = "words"
seed = 5
datasets = ["iris"]
pipelines = ["std+l2"]

[[model]]
kind = "knn"
weights = "distance"

[[model]]
kind = "svm"
kernel = "poly"
gamma = "scale"
coef0 = 0.5

[[model]]
kind = "interference"
mode = "noisy"
train_subset = 4
method = "statevector"
`

const respellNew = `name = "words"
seed = 5
datasets = ["iris"]
pipelines = ["std+l2"]

[[model]]
kind = "knn"
vote = "inverse-distance"

[[model]]
kind = "svm"
kernel = "poly"
gamma = "inverse-variance"
offset = 0.5

[[model]]
kind = "interference"
mode = "noisy"
train_subset = 4
simulator = "state-vector"
`

// TestDeprecatedSpellingsWarn checks the warnings of a spec in the old
// spellings: one per key written in an old spelling, naming the file, the
// key's line and the new spelling, in line order; and that it parses to
// the same models as the spec in the new spellings, which has none.
func TestDeprecatedSpellingsWarn(t *testing.T) {
	old, err := spec.Parse("old.toml", []byte(respellOld))
	if err != nil {
		t.Fatal(err)
	}
	cur, err := spec.Parse("new.toml", []byte(respellNew))
	if err != nil {
		t.Fatal(err)
	}
	want := []string{
		`old.toml:8: key model[1].weights: weights = "distance" is deprecated and will not be read by the next release; write vote = "inverse-distance"`,
		`old.toml:13: key model[2].gamma: gamma = "scale" is deprecated and will not be read by the next release; write gamma = "inverse-variance"`,
		`old.toml:14: key model[2].coef0: coef0 = 0.5 is deprecated and will not be read by the next release; write offset = 0.5`,
		`old.toml:20: key model[3].method: method = "statevector" is deprecated and will not be read by the next release; write simulator = "state-vector"`,
	}
	if !reflect.DeepEqual(old.Warnings, want) {
		t.Errorf("warnings:\n%s\nwant:\n%s", strings.Join(old.Warnings, "\n"), strings.Join(want, "\n"))
	}
	if len(cur.Warnings) != 0 {
		t.Errorf("the new spelling warns: %q", cur.Warnings)
	}
	if len(old.Models) != len(cur.Models) {
		t.Fatalf("%d models, want %d", len(old.Models), len(cur.Models))
	}
	for i := range old.Models {
		o, n := old.Models[i], cur.Models[i]
		if o.Name != n.Name || !reflect.DeepEqual(o.Params, n.Params) || !reflect.DeepEqual(o.New(1), n.New(1)) {
			t.Errorf("model %d: old %q %v, new %q %v", i+1, o.Name, o.Params, n.Name, n.Params)
		}
	}
	if got := spec.CanonicalSHA(old.Source); got != spec.CanonicalSHA(cur.Source) {
		t.Error("the two spellings have different canonical digests (run identities)")
	}
}

// TestRespelledCanonicalSHA checks that the canonical digest reads old
// spellings as the new ones, in [[model]] tables and inline model
// arrays, and still changes with any value.
func TestRespelledCanonicalSHA(t *testing.T) {
	head := "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n"
	a := spec.CanonicalSHA([]byte(head + "[[model]]\nkind = \"knn\"\nvote = [\"equal\", \"inverse-distance\"]\n"))
	for _, same := range []string{
		head + "[[model]]\nkind = \"knn\"\nweights = [\"uniform\", \"distance\"]\n",
		head + "[[model]]\nkind = \"knn\"\nweights = [\"Uniform\", \"distance\"]\n", // the old parser ignored case
		head + "model = [{ kind = \"knn\", weights = [\"uniform\", \"distance\"] }]\n",
	} {
		if spec.CanonicalSHA([]byte(same)) != a {
			t.Errorf("%q: digest differs from the new spelling's", same)
		}
	}
	for _, diff := range []string{
		head + "[[model]]\nkind = \"knn\"\nvote = [\"inverse-distance\", \"equal\"]\n",
		head + "[[model]]\nkind = \"knn\"\nweights = [\"distance\", \"uniform\"]\n",
		head + "[[model]]\nkind = \"svm\"\nweights = [\"uniform\", \"distance\"]\n", // not a key of svm: not renamed
	} {
		if spec.CanonicalSHA([]byte(diff)) == a {
			t.Errorf("%q: digest equals the original's", diff)
		}
	}
	svm := spec.CanonicalSHA([]byte(head + "[[model]]\nkind = \"svm\"\nkernel = \"poly\"\ngamma = \"inverse-variance\"\noffset = 1.0\n"))
	if spec.CanonicalSHA([]byte(head+"[[model]]\nkind = \"svm\"\nkernel = \"poly\"\ncoef0 = 1.0\ngamma = \"scale\"\n")) != svm {
		t.Error("svm: old and new spellings have different digests")
	}
	if spec.CanonicalSHA([]byte(head+"[[model]]\nkind = \"svm\"\nkernel = \"poly\"\ncoef0 = 1\ngamma = \"scale\"\n")) == svm {
		t.Error("svm: offset 1 (integer) and 1.0 have the same digest; the canonical form keeps value types")
	}
}

// TestRespelledSpecErrors checks the located errors of the old spellings:
// both spellings of a key in one table, and a bad value under an old key
// (located at that key, with the new names in the message).
func TestRespelledSpecErrors(t *testing.T) {
	base := "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\n"
	for _, c := range []struct {
		src, key string
		line     int
		want     []string
	}{
		{base + "kind = \"knn\"\nvote = \"equal\"\nweights = \"uniform\"\n", "model[1].weights", 7, []string{"both vote and its old spelling weights"}},
		{base + "kind = \"svm\"\ncoef0 = 1.0\noffset = 1.0\n", "model[1].coef0", 6, []string{"both offset and its old spelling coef0"}},
		{base + "kind = \"interference\"\nmethod = \"density\"\nsimulator = \"density-matrix\"\n", "model[1].method", 6, []string{"both simulator and its old spelling method"}},
		{base + "kind = \"knn\"\nk = 3\nweights = \"majority\"\n", "model[1].weights", 7, []string{"equal", "inverse-distance"}},
		{base + "kind = \"interference\"\nmode = \"noisy\"\nmethod = \"mps\"\n", "model[1].method", 7, []string{"density-matrix", "state-vector", "trajectories"}},
		{base + "kind = \"svm\"\ngamma = \"auto\"\n", "model[1].gamma", 6, []string{`"inverse-variance"`}},
	} {
		_, err := spec.Parse("s.toml", []byte(c.src))
		var ie *input.Error
		if !errors.As(err, &ie) || !errors.Is(err, input.ErrBad) {
			t.Errorf("spec %q: error %v, want an input.Error", c.src, err)
			continue
		}
		if ie.Key != c.key || ie.Line != c.line {
			t.Errorf("spec %q: key %q line %d, want key %q line %d (%v)", c.src, ie.Key, ie.Line, c.key, c.line, err)
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("spec %q: error %q lacks %q", c.src, err, w)
			}
		}
	}
}
