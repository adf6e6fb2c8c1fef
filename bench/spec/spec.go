package spec

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/datasets"
	"fringe/results"
)

// Spec is a parsed experiment specification (see DESIGN.md for the format).
type Spec struct {
	Name      string
	Seed      uint64
	Datasets  []Dataset
	Pipelines []string
	CV        CV
	Models    []modelkit.Spec
	Tune      Tune // the inner protocol of tuned models
	// Report is the [report] table: what the tables of summary.tex and
	// summary.md show and how they are laid out (report.go); without
	// model labels, which ReportOptions adds.
	Report results.ReportOptions

	// Warnings are located, one-line notes about the spec that do not
	// stop it: what it leaves to a default a reader may not expect (no
	// pipelines key: the raw features) and old spellings ("file:line: key
	// model[2].weights: ... is deprecated ...; write vote = ..."), in the
	// order of the spec's tables. The command prints them once on standard
	// error and the run's manifest records them.
	Warnings []string

	File   string // path the spec was read from, or a description of a built-in spec
	Dir    string // directory relative CSV paths are resolved against ("" = working directory)
	Source []byte // the spec text as read

}

// Dataset selects a dataset and its options.
type Dataset struct {
	Name        string   // embedded name, synthetic name or CSV path
	Classes     []string // optional class subset
	Features    []string // optional feature subset (names or 0-based indices)
	As          string   // optional display name
	Label       string   // CSV only: label column name (default: last column)
	DropInvalid bool     // files only: drop rows with missing or non-numeric values
	Format      string   // files only: "csv", "arff" or "svmlight"; "" picks by extension
	IndexBase   string   // svmlight only: "one" (default), "zero" or "auto"

	Line int // line of the entry in the spec file (0 if unknown)
}

// Display is the name shown in outputs.
func (d Dataset) Display() string {
	if d.As != "" {
		return d.As
	}
	return d.Name
}

// CVMethod is a cross-validation scheme.
type CVMethod int

const (
	CVStratified CVMethod = iota
	CVLeaveOneOut
	CVHoldout
)

func (m CVMethod) String() string {
	switch m {
	case CVStratified:
		return "stratified"
	case CVLeaveOneOut:
		return "loo"
	case CVHoldout:
		return "holdout"
	}
	return fmt.Sprintf("CVMethod(%d)", int(m))
}

// CV is the cross-validation protocol.
type CV struct {
	Method       CVMethod
	Folds        int      // stratified only
	Repeats      int      // stratified and holdout
	TestFraction float64  // holdout only
	Test         TestKind // paired test of two models on a dataset (report.go)
	Alpha        float64  // significance level of the tests; 0 means DefaultTestAlpha
	Reference    string   // model the others are tested against; "" = best classical baseline per dataset
	// TrainSizes are the learning curve's training-set sizes, fractions of
	// each outer training part in (0, 1), ascending; a size of 1 is the
	// run itself. nil: no learning curve.
	TrainSizes []float64
}

type rawSpec struct {
	Name      string           `toml:"name"`
	Seed      *int64           `toml:"seed"`
	Datasets  []string         `toml:"datasets"`
	Dataset   []rawDataset     `toml:"dataset"`
	Pipelines []string         `toml:"pipelines"`
	CV        *rawCV           `toml:"cv"`
	Tune      *rawTune         `toml:"tune"`
	Model     []map[string]any `toml:"model"`
	Report    map[string]any   `toml:"report"`
}

type rawTune struct {
	Folds  *int    `toml:"folds"`
	Metric *string `toml:"metric"`
}

type rawDataset struct {
	Name        string   `toml:"name"`
	Classes     []string `toml:"classes"`
	Features    []any    `toml:"features"`
	As          string   `toml:"as"`
	Label       string   `toml:"label"`
	DropInvalid bool     `toml:"drop_invalid"`
	Format      string   `toml:"format"`
	IndexBase   string   `toml:"index_base"`
}

type rawCV struct {
	Method       string   `toml:"method"`
	Folds        *int     `toml:"folds"`
	Repeats      *int     `toml:"repeats"`
	TestFraction *float64 `toml:"test_fraction"`
	Test         *string  `toml:"test"`
	Alpha        *float64 `toml:"alpha"`
	Reference    *string  `toml:"reference"`
	TrainSizes   []any    `toml:"train_sizes"`
}

// Load reads and validates a spec file.
func Load(path string) (*Spec, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, &input.Error{File: path, Err: fmt.Errorf("read spec: %w", err)}
	}
	s, err := Parse(path, data)
	if err != nil {
		return nil, err
	}
	s.Dir = filepath.Dir(path)
	return s, nil
}

// Parse parses and validates spec text; file names the source in errors.
func Parse(file string, data []byte) (*Spec, error) {
	var raw rawSpec
	md, err := toml.NewDecoder(bytes.NewReader(data)).Decode(&raw)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, &input.Error{File: file, Line: pe.Position.Line, Err: fmt.Errorf("spec syntax: %s", pe.Message)}
		}
		return nil, &input.Error{File: file, Err: fmt.Errorf("spec: %w", err)}
	}
	lines := newKeyLines(data)
	bad := func(key string, format string, args ...any) error {
		return &input.Error{File: file, Line: lines.find(key), Key: key, Err: fmt.Errorf(format, args...)}
	}
	if und := md.Undecoded(); len(und) > 0 {
		for _, k := range und {
			ks := k.String()
			if strings.HasPrefix(ks, "model.") || ks == "model" || strings.HasPrefix(ks, "report.") {
				continue // model keys are checked per kind below, report keys by parseReport
			}
			return nil, bad(ks, "unknown key (allowed at top level: name, seed, datasets, dataset, pipelines, cv, tune, model, report; in [cv]: method, folds, repeats, test_fraction, test, alpha, reference, train_sizes; in [tune]: folds, metric; in [[dataset]]: name, classes, features, as, label, drop_invalid, format, index_base)")
		}
	}
	if err := checkText(data, bad); err != nil {
		return nil, err
	}
	s := &Spec{File: file, Source: append([]byte(nil), data...)}
	s.Name = raw.Name
	if s.Name == "" {
		return nil, bad("name", "missing spec name")
	}
	if msg := checkName("spec name", s.Name); msg != "" {
		return nil, bad("name", "%s", msg)
	}
	if strings.ContainsAny(s.Name, "/\\") || s.Name == "." || s.Name == ".." {
		return nil, bad("name", "spec name %q must not contain path separators", s.Name)
	}
	if raw.Seed == nil {
		return nil, bad("seed", "missing seed (any non-negative integer)")
	}
	if *raw.Seed < 0 {
		return nil, bad("seed", "seed must be non-negative, got %d", *raw.Seed)
	}
	s.Seed = uint64(*raw.Seed)

	if s.Datasets, err = parseDatasets(&raw, lines, bad); err != nil {
		return nil, err
	}
	if s.Pipelines, err = parsePipelines(raw.Pipelines, bad); err != nil {
		return nil, err
	}
	if len(raw.Pipelines) == 0 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("%s: %s", file, NoPipelinesWarning))
	}
	if s.CV, err = parseCV(raw.CV, bad); err != nil {
		return nil, err
	}
	if s.Models, err = parseModels(raw.Model, s.CV.Reference, file, lines, bad, &s.Warnings); err != nil {
		return nil, err
	}
	if s.Tune, err = parseTune(raw.Tune, s.Models, bad); err != nil {
		return nil, err
	}
	if s.Report, err = parseReport(raw.Report, file, lines); err != nil {
		return nil, err
	}
	if err := s.checkReport(reportParser{file: file, lines: lines}); err != nil {
		return nil, err
	}
	return s, nil
}

// parseDatasets reads the datasets list and the [[dataset]] tables, in
// that order, and refuses empty and repeated display names.
func parseDatasets(raw *rawSpec, lines keyLines, bad func(key, format string, args ...any) error) ([]Dataset, error) {
	var out []Dataset
	for _, n := range raw.Datasets {
		if n == "" {
			return nil, bad("datasets", "empty dataset name")
		}
		out = append(out, Dataset{Name: n, Line: lines.find("datasets")})
	}
	for i, d := range raw.Dataset {
		key := fmt.Sprintf("dataset[%d]", i+1)
		if d.Name == "" {
			return nil, bad(key+".name", "missing dataset name")
		}
		ds := Dataset{Name: d.Name, Classes: d.Classes, As: d.As, Label: d.Label, DropInvalid: d.DropInvalid,
			Format: d.Format, IndexBase: d.IndexBase, Line: lines.find(key + ".name")}
		if _, err := datasets.ParseFormat(d.Format); err != nil {
			return nil, bad(key+".format", "%v", err)
		}
		if _, err := datasets.ParseIndexBase(d.IndexBase); err != nil {
			return nil, bad(key+".index_base", "%v", err)
		}
		if d.IndexBase != "" && d.Format != "svmlight" && datasets.FormatOf(d.Name) != datasets.FormatSVMLight {
			return nil, bad(key+".index_base", "index_base applies to svmlight files only")
		}
		for _, f := range d.Features {
			switch v := f.(type) {
			case string:
				ds.Features = append(ds.Features, v)
			case int64:
				if v < 0 {
					return nil, bad(key+".features", "negative feature index %d", v)
				}
				ds.Features = append(ds.Features, strconv.FormatInt(v, 10))
			default:
				return nil, bad(key+".features", "features are names or 0-based indices, got %v", f)
			}
		}
		out = append(out, ds)
	}
	if len(out) == 0 {
		return nil, bad("datasets", "no datasets (give `datasets = [...]` or [[dataset]] tables)")
	}
	seen := map[string]bool{}
	for i, d := range out {
		if msg := checkName("dataset name", d.Display()); msg != "" {
			key := "datasets"
			if i >= len(raw.Datasets) {
				key = fmt.Sprintf("dataset[%d].name", i-len(raw.Datasets)+1)
				if d.As != "" {
					key = fmt.Sprintf("dataset[%d].as", i-len(raw.Datasets)+1)
				}
			}
			return nil, bad(key, "%s", msg)
		}
		if seen[d.Display()] {
			return nil, bad("datasets", "dataset %q appears twice (use `as` to tell two selections apart)", d.Display())
		}
		seen[d.Display()] = true
	}
	return out, nil
}

// NoPipelinesWarning is the warning of a spec without pipelines (or with
// an empty list): it runs pipeline raw, which a reader of its results may
// not expect (distance-based models on unscaled features).
const NoPipelinesWarning = `no pipelines given, so every model sees the features as read (pipeline raw: no scaling, no unit norm); write pipelines = ["raw"] to keep that without this warning, or choose steps, e.g. pipelines = ["std+l2"]`

// parsePipelines validates the pipelines list ("raw" when absent).
func parsePipelines(pipes []string, bad func(key, format string, args ...any) error) ([]string, error) {
	out := pipes
	if len(out) == 0 {
		out = []string{"raw"}
	}
	seenP := map[string]bool{}
	for _, p := range out {
		if seenP[p] {
			return nil, bad("pipelines", "pipeline %q appears twice", p)
		}
		seenP[p] = true
		if err := CheckPipeline(p); err != nil {
			return nil, bad("pipelines", "%v", err)
		}
	}
	return out, nil
}

// parseCV reads the [cv] table (nil: the defaults).
func parseCV(raw *rawCV, bad func(key, format string, args ...any) error) (CV, error) {
	cv := CV{Method: CVStratified, Folds: 10, Repeats: 1, TestFraction: 0.3}
	if raw != nil {
		switch raw.Method {
		case "", "stratified":
			cv.Method = CVStratified
		case "loo":
			cv.Method = CVLeaveOneOut
		case "holdout":
			cv.Method = CVHoldout
		default:
			return CV{}, bad("cv.method", "unknown method %q (want stratified, loo or holdout)", raw.Method)
		}
		if raw.Folds != nil {
			if cv.Method != CVStratified {
				return CV{}, bad("cv.folds", "folds applies to method = \"stratified\" only")
			}
			cv.Folds = *raw.Folds
			if cv.Folds < 2 {
				return CV{}, bad("cv.folds", "folds must be at least 2, got %d", cv.Folds)
			}
		}
		if raw.Repeats != nil {
			if cv.Method == CVLeaveOneOut && *raw.Repeats != 1 {
				return CV{}, bad("cv.repeats", "leave-one-out is deterministic: repeats must be 1")
			}
			cv.Repeats = *raw.Repeats
			if cv.Repeats < 1 {
				return CV{}, bad("cv.repeats", "repeats must be at least 1, got %d", cv.Repeats)
			}
		}
		if raw.TestFraction != nil {
			if cv.Method != CVHoldout {
				return CV{}, bad("cv.test_fraction", "test_fraction applies to method = \"holdout\" only")
			}
			cv.TestFraction = *raw.TestFraction
			if !(cv.TestFraction > 0 && cv.TestFraction < 1) {
				return CV{}, bad("cv.test_fraction", "test_fraction must lie in (0, 1), got %v", cv.TestFraction)
			}
		}
	}
	if raw != nil {
		if err := parseCVTests(&cv, raw, bad); err != nil {
			return CV{}, err
		}
		if raw.TrainSizes != nil {
			sizes, err := parseTrainSizes(raw.TrainSizes, bad)
			if err != nil {
				return CV{}, err
			}
			cv.TrainSizes = sizes
		}
	}
	return cv, nil
}

// parseModels validates every [[model]] table through modelkit.Parse,
// locating its errors and adding a located warning to warns for every old
// spelling a table used, refuses repeated model names and checks the
// reference model of the tests (ref, "" for none) against the names.
func parseModels(tables []map[string]any, ref, file string, lines keyLines, bad func(key, format string, args ...any) error, warns *[]string) ([]modelkit.Spec, error) {
	var out []modelkit.Spec
	if len(tables) == 0 {
		return nil, bad("model", "no models (add [[model]] tables)")
	}
	names := map[string]int{}
	for i, m := range tables {
		key := fmt.Sprintf("model[%d]", i+1)
		ms, err := modelkit.Parse(m)
		if err != nil {
			var ke *modelkit.KeyError
			if errors.As(err, &ke) {
				k := key + "." + ke.Key
				return nil, &input.Error{File: file, Line: lines.find(k), Key: k, Err: ke.Err}
			}
			return nil, &input.Error{File: file, Line: lines.find(key), Key: key, Err: err}
		}
		ms.Line = lines.find(key)
		var deps []*input.Error
		for _, d := range ms.Deprecated {
			k := key + "." + d.Key
			deps = append(deps, &input.Error{File: file, Line: lines.find(k), Key: k, Err: errors.New(d.Message)})
		}
		slices.SortStableFunc(deps, func(a, b *input.Error) int { return a.Line - b.Line })
		for _, d := range deps {
			*warns = append(*warns, d.Error())
		}
		if msg := checkName("model name", ms.Name); msg != "" {
			return nil, bad(key+".name", "%s", msg)
		}
		if j, dup := names[ms.Name]; dup {
			return nil, bad(key, "model name %q is also used by model[%d]; give one of them a distinct `name`", ms.Name, j)
		}
		names[ms.Name] = i + 1
		out = append(out, ms)
	}
	if ref != "" {
		if _, ok := names[ref]; !ok {
			return nil, bad("cv.reference", "reference %q is not the name of a model of the spec", ref)
		}
	}
	return out, nil
}

// LineOf returns the 1-based line of a key path such as "model[2].gamma",
// "cv.folds" or "model[1]" in the spec text, or 0 when it cannot be
// located.
func (s *Spec) LineOf(key string) int { return newKeyLines(s.Source).find(key) }

// keyLines finds the line of a key path such as "model[2].gamma" or
// "cv.folds" in TOML text, for error messages. It understands the subset of
// TOML a spec uses: [table], [[array]] and key = value lines. It returns 0
// when the key cannot be located.
type keyLines struct {
	lines []string
}

func newKeyLines(data []byte) keyLines {
	return keyLines{lines: strings.Split(string(data), "\n")}
}

func (kl keyLines) find(path string) int {
	table, index, key := "", 0, path
	if i := strings.Index(path, "["); i >= 0 {
		j := strings.Index(path, "]")
		if j > i {
			table = path[:i]
			index, _ = strconv.Atoi(path[i+1 : j])
			key = strings.TrimPrefix(path[j+1:], ".")
		}
	} else if i := strings.Index(path, "."); i >= 0 {
		table, key = path[:i], path[i+1:]
	}
	if k := strings.Index(key, "."); k >= 0 {
		key = key[:k]
	}
	cur, count := "", 0
	headerLine := 0
	for n, l := range kl.lines {
		t := strings.TrimSpace(l)
		switch {
		case strings.HasPrefix(t, "[["):
			name := strings.TrimSpace(strings.Trim(strings.SplitN(t, "#", 2)[0], "[] \t"))
			cur = name
			if name == table {
				count++
				if count == index {
					headerLine = n + 1
				}
			}
			continue
		case strings.HasPrefix(t, "["):
			cur = strings.TrimSpace(strings.Trim(strings.SplitN(t, "#", 2)[0], "[] \t"))
			if cur == table && index == 0 {
				headerLine = n + 1
			}
			if table == "" && cur == key && headerLine == 0 {
				headerLine = n + 1 // a table named alone ("tune")
			}
			continue
		}
		eq := strings.Index(t, "=")
		if eq < 0 || strings.HasPrefix(t, "#") {
			continue
		}
		k := strings.Trim(strings.TrimSpace(t[:eq]), `"`)
		if k != key || cur != table {
			continue
		}
		if index > 0 && count != index {
			continue
		}
		return n + 1
	}
	return headerLine
}

// CheckPipeline validates a pipeline string without fitting anything.
func CheckPipeline(s string) error {
	_, err := datasets.ParsePipeline(s)
	return err
}

// IsPath reports whether a dataset name refers to a file rather than an
// embedded or synthetic dataset: it contains a path separator or ends in
// an extension of a data file (.csv, .tsv, .txt, .arff, .svm, .svmlight,
// .libsvm, each optionally .gz; write ./name for other files).
func IsPath(name string) bool {
	return strings.ContainsAny(name, `/\`) || datasets.FormatOf(name) != datasets.FormatAuto
}

// IsFile reports whether the dataset is read from a file: its name is a
// path (IsPath) or it gives a format.
func (d Dataset) IsFile() bool { return IsPath(d.Name) || d.Format != "" }

// parseTrainSizes reads cv.train_sizes: fractions in (0, 1] of each outer
// training part (1 is the run itself and adds nothing), kept ascending and
// without repeats.
func parseTrainSizes(raw []any, bad func(key, format string, args ...any) error) ([]float64, error) {
	if len(raw) == 0 {
		return nil, bad("cv.train_sizes", "an empty list (give fractions of the training part, e.g. [0.1, 0.25, 0.5, 1.0])")
	}
	var out []float64
	for i, v := range raw {
		var f float64
		switch x := v.(type) {
		case float64:
			f = x
		case int64:
			f = float64(x)
		default:
			return nil, bad("cv.train_sizes", "value %d: want a fraction of the training part, got %v", i+1, v)
		}
		if !(f > 0 && f <= 1) {
			return nil, bad("cv.train_sizes", "value %d: %v is not a fraction in (0, 1]", i+1, v)
		}
		if f < 1 && !slices.Contains(out, f) {
			out = append(out, f)
		}
	}
	slices.Sort(out)
	return out, nil
}
