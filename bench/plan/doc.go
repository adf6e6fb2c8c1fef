// Package plan turns a spec into a plan: the datasets loaded (embedded,
// synthetic or from a file, with their class and feature selections), the
// splits drawn, and the list of tasks, each one (dataset, pipeline, model,
// repeat, fold) with a stable key. Building a plan checks everything that
// can be checked before a model is fitted — parameters against the data
// (k of k-NN, train_subset), circuits against the simulators' qubit limits
// and against the connected qubits of a model's device, calibration files
// against the class registers (device.go) — so bad input fails fast and
// leaves nothing behind; every such error is an input error. New loads
// the models' device and calibration files (modelkit.Spec.Resolve,
// relative to the spec's folder); their digests enter the Fingerprint.
//
// Memory: TaskMemory estimates one task's peak memory (the model's own
// estimate, from baselines and qkernel, on the largest training part, and
// the prepared data of its unit, with the garbage collector's headroom);
// DataBytes the loaded datasets; CheckMemory refuses a plan whose workers
// tasks at once and the data exceed a limit (the command's -memory), as an
// input error naming the model's key (cache_mib of an SVM whose cache is
// smaller than its kernel matrix, train_subset of a circuit simulated gate
// by gate, the model otherwise) with the estimate and the remedies.
//
// Seeds: Seed and NewRand derive generators from the run seed and a key,
// never from scheduling. The splits of a dataset depend only on the seed,
// its display name and the repeat, so every pipeline and model sees the
// same folds. ModelSeed gives each task its model's seed; InterferenceSeed
// gives every interference model of a split one shared seed (paired
// comparisons, and exported circuits that match the run).
//
// Units and shards: the tasks that share a dataset, pipeline and split form
// a unit of work (the pipeline is fitted once per unit, Prepare); a Shard
// deals whole units round-robin. Fingerprint digests everything the plan
// computes on, for the identity of partial runs.
//
// Cost: Estimate says what some of the tasks will cost before anything
// runs, from the sizes alone (training and test rows, features after the
// pipelines, classes) under a sim.CostModel calibrated on the machine: per
// model and per (dataset, pipeline, model) cell the tasks, the model fits
// (Fits: tuned models fit every grid point on every inner fold), the
// largest circuit's qubits and gate counts, the simulator, and the CPU
// time of one thread with the longest task. Interference models are
// estimated by qkernel.Classifier.EstimateCost, k-NN and nearest centroid
// by their multiply-adds; SVMs, logistic regression (iterative solvers),
// counts and command models are not estimated and are named as such
// (NotEstimated). Estimates are good to a small factor on an idle machine;
// a loaded one runs longer by the share of the CPU it gives the run.
//
// Imports: bench/input, bench/spec, bench/modelkit, bench/cv and the model
// packages. It must never import runner, report, export, assess, cluster or
// results.
package plan
