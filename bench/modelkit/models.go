package modelkit

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"fringe/baselines"
	"fringe/qkernel"
	"fringe/qkernel/sim"
)

// builder makes a fresh, unfitted model for one task. seed is the task's
// seed, derived from the run seed and the task key.
type builder func(seed uint64) baselines.Model

// Spec is one validated model configuration of a spec's [[model]] table:
// its kind, its display name and its parameters. New builds a fresh,
// unfitted model from it.
type Spec struct {
	Kind   string
	Name   string         // display name (the table's `name`, or a label built from kind and params)
	Params map[string]any // the validated parameters, by key
	Line   int            // line of the table in the spec file (0 if unknown); set by the spec parser

	// Label is the table's optional `label`: what summary.tex and
	// summary.md show for the model ("QC, 512 shots"); "" shows Name. The
	// CSV files, task keys and figures keep Name.
	Label string

	// Interference is the configuration of an interference model (nil for
	// other kinds); its Seed is set per task by New.
	Interference *qkernel.Classifier

	// Pipeline holds steps applied after the run's pipeline, fitted on the
	// model's training part ("" for none): the model's own `pipelines`
	// key with one value.
	Pipeline string
	// Deprecated lists the old spellings the table used (see Respellings),
	// in the order of Respellings; the spec parser turns them into located
	// warnings.
	Deprecated []Deprecation

	// Grid is non-nil for a tuned model: a key given a list of values (or
	// `pipelines` with several), searched by inner cross-validation on
	// every outer training part (see Grid). The Spec's other fields are
	// those of the grid's first point.
	Grid *Grid

	build builder
	hw    *hardware // device, mitigation and calibration keys (nil: none); shared by copies
}

// New builds a fresh, unfitted model for a task with the given seed.
func (m Spec) New(seed uint64) baselines.Model { return m.build(seed) }

// InputFiles lists the files the model reads while it runs, resolved
// against dir (the spec's folder): the counts file of a counts model, the
// device and calibration files of an interference or counts model, and
// every argument of a command model that names an existing regular file
// (its script, say; the program runs in dir). A change to one of them
// between sessions must not mix old and new results, so the run's
// fingerprint covers them.
func (m Spec) InputFiles(dir string) []string {
	var out []string
	switch m.Kind {
	case "interference":
		out = append(out, m.hw.inputFiles(dir)...)
	case "counts":
		if f, ok := m.Params["file"].(string); ok {
			out = append(out, countsPath(dir, f))
		}
		out = append(out, m.hw.inputFiles(dir)...)
	case "command":
		run, _ := m.Params["run"].([]string)
		for _, arg := range run {
			path := arg
			if !filepath.IsAbs(path) && dir != "" {
				path = filepath.Join(dir, path)
			}
			if fi, err := os.Stat(path); err == nil && fi.Mode().IsRegular() {
				out = append(out, path)
			}
		}
	}
	return out
}

// Info describes a model kind for `fringe list`.
type Info struct {
	Kind, Keys, Description string
}

// Infos lists the model kinds a spec may use.
func Infos() []Info {
	return []Info{
		{"interference", "mode, balance, shots, train_subset, noise, simulator, trajectories, device, mitigate, calibration", "the interference (distance-based) quantum classifier of Schuld, Fingerhuth & Petruccione (2017); mode exact (closed form) | circuit (compiled circuit, simulated) | shots (finite shots, post-selected) | noisy (gate-level or closed-form noise, or device = NAME|FILE: compiled, routed and simulated under the device's calibrated noise); balance = true weights the index register by 1/(C*M_k); mitigate = \"readout\" inverts the readout confusion (calibration = FILE: calibration counts); simulator of gate-level noise auto | density-matrix | trajectories | state-vector: auto takes the exact density matrix up to " + strconv.Itoa(sim.MaxDensityQubits) + " qubits and trajectories above, trajectories averages `trajectories` Monte Carlo state vectors with random noise jumps (default " + strconv.Itoa(sim.DefaultTrajectories) + "), state-vector is noiseless"},
		{"knn", "k, metric, vote, search", "k-nearest neighbours; metric euclidean|manhattan|cosine; vote equal (one vote per neighbour) | inverse-distance (a neighbour at distance d votes 1/d; neighbours at distance 0, if any, alone vote); search auto|brute|tree (the exact k-d tree gives brute force's neighbours and ties); ties: nearer then lower index, vote ties to the first class"},
		{"svm", "kernel, C, gamma, degree, offset, tol, cache_mib, shrinking", "C-SVC by SMO with second-order working-set selection (Fan, Chen & Lin 2005) and shrinking (LIBSVM); kernel linear <x,x'> | rbf exp(-gamma*|x-x'|^2) | poly (gamma*<x,x'> + offset)^degree | interference (1 + <x,x'>)/2; gamma a number or \"inverse-variance\" (the default) = 1/(d*Var(X)), d features and Var the population variance of all entries of the training part (1 when that is 0); degree default 3, offset default 0; kernel rows cached in cache_mib MiB per class pair (default 200); one-vs-one; absurd parameters are refused"},
		{"logreg", "C, max_iter", "logistic regression in scikit-learn's default forms: binary (one weight vector) for two classes, multinomial for three or more; L2 penalty 1/C (intercept unpenalised); L-BFGS"},
		{"centroid", "", "nearest centroid (Euclidean), a sanity baseline"},
		{"command", "run, timeout", "your own classifier as a program, run once per task: run = [\"python3\", \"mine.py\"] gets the paths of TRAIN (row,label,<features>), TEST (row,<features>) and OUT, and writes OUT as row,predicted[,prob_<class>...]; FRINGE_SEED holds the task's seed; timeout in seconds"},
		{"counts", "file, balance, train_subset, mitigate, device, calibration", "outcomes measured on a device for the circuits of `fringe circuit -export` (file = CSV with dataset,repeat,fold,row,ancilla,class,count[,pipeline]), decided by post-selection as shot mode does; balance and train_subset as the exported circuits; mitigate = \"readout\" with calibration = FILE (calibration counts) or device = NAME|FILE (the device of -export -device)"},
	}
}

// parseOne validates one [[model]] table with a single value per key.
func parseOne(m map[string]any) (Spec, error) {
	p := newParams(m)
	kind := p.str("kind", "")
	if p.err != nil {
		return Spec{}, p.err
	}
	name := p.str("name", "")
	if p.err != nil {
		return Spec{}, p.err
	}
	ms := Spec{Kind: kind, Params: map[string]any{}}
	var label string
	switch kind {
	case "":
		return ms, keyErr("kind", "missing model kind (one of %s)", kindList())
	case "interference":
		label = parseInterferenceModel(p, &ms)
	case "knn":
		label = parseKNN(p, &ms)
	case "svm":
		label = parseSVM(p, &ms)
	case "logreg":
		label = parseLogReg(p, &ms)
	case "command":
		label = parseCommand(p, &ms)
	case "counts":
		label = parseCounts(p, &ms)
	case "centroid":
		label = "centroid"
		ms.build = func(uint64) baselines.Model { return &baselines.Centroid{} }
	default:
		return ms, keyErr("kind", "unknown model kind %q (one of %s)", kind, kindList())
	}
	if err := p.finish(kind); err != nil {
		return ms, err
	}
	if name != "" {
		label = name
	}
	if strings.ContainsAny(label, ",\"\n") {
		return ms, keyErr("name", "model name %q must not contain commas, quotes or newlines", label)
	}
	ms.Name = label
	return ms, nil
}

// parseInterferenceModel reads the keys of an interference model (see
// parseInterference), sets the model's params and builder and returns its
// default label.
func parseInterferenceModel(p *params, ms *Spec) string {
	q, label, noise := parseInterference(p, ms)
	ms.Params["mode"], ms.Params["balance"] = q.Mode.String(), q.Balance
	ms.Params["shots"], ms.Params["train_subset"] = q.Shots, q.TrainSubset
	if noise != nil {
		ms.Params["noise"] = noise
	}
	hw := ms.hw
	hw.setParams(ms.Params)
	if hw != nil && hw.device != "" {
		// For the report's per-mode table: the noise is the device's.
		ms.Params["noise"] = "device " + hw.device
	}
	ms.build = func(seed uint64) baselines.Model {
		c := q
		c.Seed = seed
		if hw != nil {
			if !hw.resolved {
				return unresolvedModel{name: label}
			}
			if hw.configure(&c) {
				return &calibrated{Classifier: &c, cal: hw.cal}
			}
		}
		return &c
	}
	ms.Interference = &q
	return label
}

// parseKNN reads the keys of a k-NN model: k, metric, vote (VoteEqual or
// VoteInverseDistance) and search.
func parseKNN(p *params, ms *Spec) string {
	var label string
	k := p.integer("k", 5)
	metricS := p.str("metric", "euclidean")
	voteS := p.str("vote", VoteEqual)
	searchS := p.str("search", "auto")
	search, err := baselines.ParseKNNMethod(searchS)
	if err != nil {
		p.fail("search", "%v", err)
	}
	if p.err == nil && k < 1 {
		p.fail("k", "k must be at least 1, got %d", k)
	}
	metric, err := baselines.ParseMetric(metricS)
	if err != nil {
		p.fail("metric", "%v", err)
	}
	weights, voteS, err := parseVote(voteS)
	if err != nil {
		p.fail("vote", "%v", err)
	}
	label = fmt.Sprintf("knn-k%d", k)
	if metricS != "euclidean" {
		label += "-" + metricS
	}
	if voteS != VoteEqual {
		label += "-" + voteS
	}
	ms.Params["k"], ms.Params["metric"], ms.Params["vote"], ms.Params["search"] = k, metricS, voteS, searchS
	ms.build = func(uint64) baselines.Model {
		return &baselines.KNN{K: k, Metric: metric, Weights: weights, Method: search}
	}
	return label
}

// parseSVM reads the keys of an SVM: kernel, C, gamma (a positive number
// or GammaInverseVariance), degree, offset (the constant c of the
// polynomial kernel (gamma <x, x'> + c)^degree) and tol.
func parseSVM(p *params, ms *Spec) string {
	var label string
	kernelS := p.str("kernel", "rbf")
	c := p.number("C", 1)
	gamma := 0.0
	gammaS := GammaInverseVariance
	if p.has("gamma") {
		switch v := p.m["gamma"].(type) {
		case string:
			p.used["gamma"] = true
			if v != GammaInverseVariance {
				p.fail("gamma", "gamma is a positive number or %q (1/(d*Var(X)) on the training part), got %q", GammaInverseVariance, v)
			}
		default:
			gamma = p.number("gamma", 0)
			if p.err == nil && !(gamma > 0) {
				p.fail("gamma", "gamma must be positive, got %v", gamma)
			}
			gammaS = fmtNum(gamma)
		}
	}
	degree := p.integer("degree", 3)
	offset := p.number("offset", 0)
	tol := p.number("tol", 1e-3)
	kernel, err := baselines.ParseKernel(kernelS)
	if err != nil {
		p.fail("kernel", "%v", err)
	}
	if p.err == nil && !(c > 0) {
		p.fail("C", "C must be positive, got %v", c)
	}
	if p.err == nil && degree < 1 {
		p.fail("degree", "degree must be at least 1, got %d", degree)
	}
	if p.err == nil && !(tol > 0) {
		p.fail("tol", "tol must be positive, got %v", tol)
	}
	label = fmt.Sprintf("svm-%s-C%s", kernelS, fmtNum(c))
	if kernelS == "rbf" || kernelS == "poly" {
		if gammaS != GammaInverseVariance {
			label += "-g" + gammaS
		}
	}
	if kernelS == "poly" {
		label += fmt.Sprintf("-d%d", degree)
	}
	cacheMiB := p.number("cache_mib", baselines.DefaultCacheMiB)
	shrinking := p.boolean("shrinking", true)
	if p.err == nil && !(cacheMiB > 0) {
		p.fail("cache_mib", "cache_mib must be a positive number of MiB, got %v", cacheMiB)
	}
	if p.err == nil && !shrinking {
		label += "-noshrink"
	}
	ms.Params["kernel"], ms.Params["C"], ms.Params["gamma"] = kernelS, c, gammaS
	ms.Params["degree"], ms.Params["offset"], ms.Params["tol"] = degree, offset, tol
	ms.Params["cache_mib"], ms.Params["shrinking"] = cacheMiB, shrinking
	proto := baselines.SVM{Kernel: kernel, C: c, Gamma: gamma, Degree: degree, Coef0: offset, Tol: tol, CacheMiB: cacheMiB, NoShrinking: !shrinking}
	if p.err == nil {
		// Absurd parameters (poly degree 10^6, gamma 10^12, ...) are
		// refused here, with the bound and its reason (baselines).
		if err := proto.CheckParams(); err != nil {
			key := "kernel"
			var pe *baselines.ParamError
			if errors.As(err, &pe) {
				key = pe.Param
			}
			p.fail(key, "%v", err)
		}
	}
	ms.build = func(uint64) baselines.Model {
		m := proto
		return &m
	}
	return label
}

// parseLogReg reads the keys of a logistic regression: C and max_iter.
func parseLogReg(p *params, ms *Spec) string {
	var label string
	c := p.number("C", 1)
	maxIter := p.integer("max_iter", 0)
	if p.err == nil && !(c > 0) {
		p.fail("C", "C must be positive, got %v", c)
	}
	if p.err == nil && maxIter < 0 {
		p.fail("max_iter", "max_iter must be non-negative, got %d", maxIter)
	}
	label = "logreg-C" + fmtNum(c)
	ms.Params["C"], ms.Params["max_iter"] = c, maxIter
	ms.build = func(uint64) baselines.Model {
		return &baselines.LogReg{C: c, MaxIter: maxIter}
	}
	return label
}

func kindList() string {
	var ks []string
	for _, mi := range Infos() {
		ks = append(ks, mi.Kind)
	}
	return strings.Join(ks, ", ")
}

// fmtNum formats a parameter value for a model label: shortest form.
func fmtNum(v float64) string {
	if v == math.Trunc(v) && math.Abs(v) < 1e15 {
		return strconv.FormatInt(int64(v), 10)
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// ParamInt reads an integer parameter value as Spec.Params holds it (int,
// or int64/float64 as TOML decodes it); anything else is 0.
func ParamInt(x any) int {
	switch v := x.(type) {
	case int:
		return v
	case int64:
		return int(v)
	case float64:
		return int(v)
	}
	return 0
}

// ParamFloat reads a numeric parameter value (int, int64 or float64);
// anything else is NaN.
func ParamFloat(x any) float64 {
	switch v := x.(type) {
	case int:
		return float64(v)
	case int64:
		return float64(v)
	case float64:
		return v
	}
	return math.NaN()
}
