package datasets

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/mat"
)

// hangLimit bounds the time one fuzz input may take. The fuzzing engine
// does not notice a hang; a panic from the watchdog crashes the worker,
// which makes the engine record the input as a failure.
const hangLimit = 10 * time.Second

// watchdog panics if the calling fuzz input runs longer than hangLimit;
// the returned function stops it.
func watchdog(what string) func() bool {
	t := time.AfterFunc(hangLimit, func() { panic("fuzz: " + what + " took more than " + hangLimit.String() + " (a hang)") })
	return t.Stop
}

// FuzzReadCSV feeds arbitrary bytes to the CSV loader. It must never panic
// or hang; an error must be a located *CSVError naming the file; a dataset
// it accepts must satisfy Validate, hold at least two classes and one
// feature, and keep the label column out of the features.
func FuzzReadCSV(f *testing.F) {
	for _, s := range []string{
		"a,b,label\n1,2,x\n3,4,y\n",
		"a;b;label\n1;2;x\n3;4;y\n",
		"a\tb\tlabel\n1\t2\tx\n3\t4\ty\n",
		"\xef\xbb\xbfa,b,c\r\n1,2,x\r\n\r\n3,4,y\r\n",
		"\"a,1\",b,label\n\"1\",2,\"x\ny\"\n3,4,z\n",
		"a,b,label\n1,NA,x\n3,4,y\n5,6,x\n",
		"a,b,label\n1,nan,x\n3,inf,y\n",
		"a,a,label\n1,2,x\n3,4,y\n",
		"a,b,label\n1,2\n",
		"label,a\nx,1e308\ny,-1e-308\n",
		"",
		"a,b,label\n",
		"a,b,label\n1,2,x\n1,2,x\n",
		"a,\"b,label\n1,2,x\n",
	} {
		f.Add([]byte(s), "", false)
		f.Add([]byte(s), "label", true)
	}
	f.Fuzz(func(t *testing.T, data []byte, label string, drop bool) {
		defer watchdog("ReadCSV")()
		d, err := ReadCSV(bytes.NewReader(data), "fuzz.csv", CSVOptions{Label: label, DropInvalid: drop})
		if err != nil {
			var ce *CSVError
			if !errors.As(err, &ce) {
				t.Fatalf("error %v (%T) is not a *CSVError", err, err)
			}
			if ce.File != "fuzz.csv" || ce.Line < 1 {
				t.Fatalf("error %v does not locate the problem (file %q, line %d)", err, ce.File, ce.Line)
			}
			if !strings.HasPrefix(err.Error(), "datasets: fuzz.csv:") {
				t.Fatalf("message %q lacks the package and file prefix", err)
			}
			return
		}
		if verr := d.Validate(); verr != nil {
			t.Fatalf("accepted dataset is invalid: %v", verr)
		}
		if len(d.Classes) < 2 || d.Dim() < 1 || d.Len() < 1 {
			t.Fatalf("accepted dataset with %d classes, %d features, %d rows", len(d.Classes), d.Dim(), d.Len())
		}
		for _, c := range d.ClassCounts() {
			if c < 1 {
				t.Fatalf("class without members: counts %v", d.ClassCounts())
			}
		}
		if label != "" {
			for _, name := range d.Features {
				if name == strings.TrimSpace(label) {
					t.Fatalf("label column %q among the features", label)
				}
			}
		}
		for i := 1; i < len(d.Rows); i++ {
			if d.Rows[i] <= d.Rows[i-1] {
				t.Fatalf("row ids not increasing: %v", d.Rows)
			}
		}
	})
}

// FuzzParsePipeline feeds arbitrary pipeline strings to the parser and
// fits what it accepts on a small matrix (with a zero row, a constant
// column and extreme values) with class labels (so that select is fitted
// too). It must never panic; errors must wrap
// ErrUnknownStep or ErrStepParam (parsing) or be returned (fitting); an
// accepted pipeline's canonical name must parse to the same name, and its
// output must have as many columns as FeatureNames says.
func FuzzParsePipeline(f *testing.F) {
	for _, s := range []string{"raw", "std", "minmax", "l2", "pad", "lift", "lift(0.5)", "norm", "std+l2", "minmax+lift(2)+pad",
		" std + l2 ", "", "+", "std+", "lift(", "lift()", "lift(-1)", "lift(nan)", "lift(1e309)", "raw+std", "whiten", "lift(0x10)", "l2+l2+l2",
		"pca", "pca(2)", "pca(3)", "pca(4)", "pca(0.95)", "pca(0.5)", "pca(1.0)", "pca(0)", "pca(1.5)", "pca(-2)", "pca(x)", "pca(0x1p-2)", "pca(5e-324)",
		"select", "select(1)", "select(3)", "select(4)", "select(0)", "std+pca(2)+l2", "std+select(2)+pca(1)+lift", "pca+pad", "select(2)+pca(0.9)"} {
		f.Add(s, 1.0, false)
		f.Add(s, 1e300, true)
	}
	f.Fuzz(func(t *testing.T, s string, scale float64, zeroRow bool) {
		defer watchdog("ParsePipeline")()
		p, err := ParsePipeline(s)
		if err != nil {
			if !errors.Is(err, ErrUnknownStep) && !errors.Is(err, ErrStepParam) {
				t.Fatalf("ParsePipeline(%q): %v wraps neither ErrUnknownStep nor ErrStepParam", s, err)
			}
			if !strings.HasPrefix(err.Error(), "datasets: ") {
				t.Fatalf("message %q lacks the package prefix", err)
			}
			return
		}
		name := p.String()
		// Every canonical name must parse back to itself (the fuzzer once
		// found lift(1e+07), whose '+' split the step; the input stays in
		// testdata/fuzz/FuzzParsePipeline).
		q, err := ParsePipeline(name)
		if err != nil || q.String() != name {
			t.Fatalf("canonical name %q of %q does not parse back (%v)", name, s, err)
		}
		if math.IsNaN(scale) || math.IsInf(scale, 0) {
			scale = 1
		}
		X := mat.NewDense(4, 3, []float64{
			1, 2 * scale, 3,
			-1, 0, 3,
			0.5, -scale, 3,
			2, 1e-300, 3,
		})
		if zeroRow {
			X.SetRow(1, []float64{0, 0, 0})
		}
		Z, err := p.FitTransformLabeled(X, []int{0, 1, 0, 1}, nil)
		if err != nil {
			return // a zero row under l2, a constant under std...: reported, not a crash
		}
		_, c := Z.Dims()
		if got := len(p.FeatureNames([]string{"a", "b", "c"})); got != c {
			t.Fatalf("pipeline %q: %d output columns, FeatureNames gives %d", name, c, got)
		}
		if _, err := p.Transform(X, nil); err != nil {
			t.Fatalf("pipeline %q: Transform of the fitted data fails: %v", name, err)
		}
		// The fitted state prints the same canonical name.
		if p.String() != name {
			t.Fatalf("pipeline %q: name changed to %q by fitting", name, p.String())
		}
	})
}

// fuzzCheckLoaded is the common check of the loader fuzz targets: an
// error must be a located *CSVError naming the file (or an options error
// naming it); an accepted dataset must satisfy Validate, hold at least
// two classes with members and one feature, clean class and feature
// names, and increasing row ids.
func fuzzCheckLoaded(t *testing.T, name string, d *Dataset, err error) {
	t.Helper()
	if err != nil {
		var ce *CSVError
		if !errors.As(err, &ce) {
			t.Fatalf("error %v (%T) is not a *CSVError", err, err)
		}
		if ce.File != name || ce.Line < 1 {
			t.Fatalf("error %v does not locate the problem (file %q, line %d)", err, ce.File, ce.Line)
		}
		if !strings.HasPrefix(err.Error(), "datasets: "+name+":") {
			t.Fatalf("message %q lacks the package and file prefix", err)
		}
		return
	}
	if verr := d.Validate(); verr != nil {
		t.Fatalf("accepted dataset is invalid: %v", verr)
	}
	if len(d.Classes) < 2 || d.Dim() < 1 || d.Len() < 1 {
		t.Fatalf("accepted dataset with %d classes, %d features, %d rows", len(d.Classes), d.Dim(), d.Len())
	}
	for _, c := range d.ClassCounts() {
		if c < 1 {
			t.Fatalf("class without members: counts %v", d.ClassCounts())
		}
	}
	for _, s := range append(append([]string(nil), d.Classes...), d.Features...) {
		if _, _, bad := textProblem(s); bad {
			t.Fatalf("accepted name or label %q is not clean text", s)
		}
	}
	for i := 1; i < len(d.Rows); i++ {
		if d.Rows[i] <= d.Rows[i-1] {
			t.Fatalf("row ids not increasing: %v", d.Rows)
		}
	}
}

// FuzzReadARFF feeds arbitrary bytes to the ARFF reader: no panic, no
// hang, located errors, valid datasets (see fuzzCheckLoaded).
func FuzzReadARFF(f *testing.F) {
	for _, s := range []string{
		"@relation r\n@attribute x numeric\n@attribute c {a,b}\n@data\n1,a\n2,b\n",
		"% c\n@RELATION 'r r'\n@ATTRIBUTE 'x y' REAL\n@attribute \"c\" {'a b', \"c,d\"}\n@data\n1,'a b'\n?,\"c,d\"\n3,\"c,d\" % x\n",
		"@relation r\n@attribute x numeric\n@attribute c {a,b}\n@data\n{0 1, 1 a}\n",
		"@relation r\n@attribute s string\n@data\n",
		"@relation r\n@attribute x integer\n@attribute c {a,b}\n@attribute y numeric\n@data\n1,a,2\n3,b,4,{5}\n",
		"@relation r\n@attribute 'a\\'b' numeric\n@attribute c {x,y}\n@data\n1e308,x\n-1e308,y\n",
		"",
	} {
		f.Add([]byte(s), "", false)
		f.Add([]byte(s), "c", true)
	}
	f.Fuzz(func(t *testing.T, data []byte, label string, drop bool) {
		defer watchdog("ReadARFF")()
		d, err := ReadARFF(bytes.NewReader(data), "fuzz.arff", LoadOptions{Label: label, DropInvalid: drop})
		fuzzCheckLoaded(t, "fuzz.arff", d, err)
	})
}

// FuzzReadSVMLight feeds arbitrary bytes to the svmlight reader, with a
// small dense limit so that no input allocates much: no panic, no hang,
// located errors, valid datasets (see fuzzCheckLoaded).
func FuzzReadSVMLight(f *testing.F) {
	for _, s := range []string{
		"1 1:2 3:4\n-1 2:1.5\n",
		"# c\n+1\t1:2e-3 # x\n\n2 4:1\n",
		"1 qid:1 1:2\n2 1:3\n",
		"1 0:1\n2 3:1\n",
		"1 3:1 2:1\n",
		"1,2 1:1\n",
		"1 1:nan\n2 1:1\n3 2:1\n",
		"",
	} {
		for base := range 3 {
			f.Add([]byte(s), uint8(base), false)
			f.Add([]byte(s), uint8(base), true)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte, base uint8, drop bool) {
		defer watchdog("ReadSVMLight")()
		opt := LoadOptions{IndexBase: IndexBase(base % 3), DropInvalid: drop, MaxDenseBytes: 1 << 20}
		d, err := ReadSVMLight(bytes.NewReader(data), "fuzz.svm", opt)
		fuzzCheckLoaded(t, "fuzz.svm", d, err)
		if err == nil && int64(d.Len()*d.Dim()*8) > opt.MaxDenseBytes {
			t.Fatalf("accepted %dx%d, above the dense limit", d.Len(), d.Dim())
		}
	})
}
