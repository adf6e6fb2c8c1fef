package runner

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"
	"time"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"

	"fringe/baselines"
	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/bench/plan"
	"fringe/qkernel"
	"fringe/results"
)

// Options configure the execution of a plan.
type Options struct {
	Workers int // concurrent tasks; 0 means runtime.NumCPU()
	// Progress is called after each finished task (serialised) with the
	// model fits done so far by this call and the fits of all its tasks
	// (a tuned model's task counts one fit per grid point and inner fold,
	// plus its refit: plan.Plan.Fits); may be nil.
	Progress func(done, total int)

	// Tasks lists the task indices to run, in task order (e.g. one shard's
	// tasks, or those a resumed run still lacks); nil runs every task.
	Tasks []int
	// Save, if set, persists finished tasks (see Partial.Save). Finished
	// results are gathered and handed to Save in batches from a single
	// goroutine: at least every SaveEvery, and once more at the end, also
	// when the run fails or is cancelled, so that everything finished is
	// kept. An error from Save stops the run and is returned.
	Save func(batch []TaskResult) error
	// SaveEvery is the longest a finished task waits before it is handed
	// to Save; 0 means DefaultSaveEvery.
	SaveEvery time.Duration
	// Keep, if set, receives the results still pending when every task
	// has succeeded, instead of Save (Partial.Hold keeps them in memory):
	// for a caller that writes the complete run at once, so that a run
	// shorter than SaveEvery writes no task files only to delete them
	// again. A failed or interrupted run still saves them.
	Keep func(batch []TaskResult)
	// Grace is how long the tasks in flight may still run once ctx is
	// done (no task starts after that): after it their contexts are
	// cancelled, so that simulators stop between gates and external
	// programs are killed, and they are abandoned (their work is redone by
	// a resumed run). 0 means DefaultGrace; a negative value abandons them
	// at once.
	Grace time.Duration
	// Abandon, when it is closed, abandons the tasks in flight at once,
	// grace or not (a second interrupt). May be nil.
	Abandon <-chan struct{}
}

// DefaultGrace is the default grace period of the tasks in flight when a
// run is stopped: well under the wait that cluster schedulers give between
// their stop signal and the kill (Slurm's KillWait is 30 s by default,
// recalled, not checked here).
const DefaultGrace = 20 * time.Second

// settle is how long Execute still waits, after abandoning the tasks in
// flight, for them to return; a model that never looks at its context
// (a baseline fit) is left behind after that, its result dropped.
const settle = 2 * time.Second

// InterruptedError is the error of a run stopped through its context: how
// many tasks were abandoned in flight (the finished ones are kept). It
// unwraps to the context's error.
type InterruptedError struct {
	Abandoned int           // tasks in flight when the grace period ended, not kept
	Grace     time.Duration // the grace period that was given
	Err       error         // ctx.Err()
}

func (e *InterruptedError) Error() string {
	if e.Abandoned == 0 {
		return "interrupted: " + e.Err.Error()
	}
	return fmt.Sprintf("interrupted: %v; %d task(s) in flight abandoned", e.Err, e.Abandoned)
}

func (e *InterruptedError) Unwrap() error { return e.Err }

// errAbandoned cancels the tasks in flight.
var errAbandoned = errors.New("runner: task abandoned when the run stopped")

// DefaultSaveEvery is how long a finished task waits at most before it is
// persisted: a run killed without warning redoes at most about this much
// work per worker. Batching keeps the cost of persistence negligible when
// tasks take a fraction of a millisecond.
const DefaultSaveEvery = time.Second

// TaskResult is what one task produced.
type TaskResult struct {
	Task    plan.Task
	NTrain  int
	NTest   int
	Pred    []int            // predicted class per test instance (split order)
	Details []qkernel.Detail // per test instance, for models that report them; else nil
	Scores  results.Scores
	Elapsed time.Duration
	// Tuning is the grid search of a tuned model (nil otherwise).
	Tuning *Tuning
	// ConstantDecision: the model predicted one class on every test
	// instance of the task and its decision values (baselines.Decisions)
	// were equal on all of them, i.e. it does not discriminate at all.
	ConstantDecision bool
}

// Execute runs the tasks of the plan (all, or opt.Tasks) on a worker pool
// and returns their results in the order of opt.Tasks (task order when
// opt.Tasks is nil). Each task gets its own generator seed derived from the
// run seed and the task key, so results do not depend on the number of
// workers, on scheduling, or on which other tasks run in the same process.
// On the first error tasks not yet started are skipped, tasks in flight
// are cancelled, finished ones are handed to opt.Save, and the error is
// returned; errors caused by the input satisfy errors.Is(err,
// input.ErrBad). When ctx is cancelled, no task starts any more, tasks in
// flight get opt.Grace to finish (see Options), finished ones are handed
// to opt.Save, and an *InterruptedError is returned; Execute returns
// within the grace period plus a few seconds, whatever the models do.
//
// Tasks that share a dataset, pipeline and split are scheduled together as
// one unit of work, so the pipeline is fitted and applied once for all the
// models of that split; models never modify their input matrices. When
// there are fewer than 8 units per worker, each task is scheduled on its
// own instead, and the tasks of a unit share its split, prepared once by
// the first of them to start (so that a few large folds still keep every
// worker busy).
//
// Execute panics if opt.Tasks holds an index out of range or twice: that
// is a broken invariant of the caller, not bad input.
func Execute(ctx context.Context, p *plan.Plan, opt Options) ([]TaskResult, error) {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	tasks := opt.Tasks
	if tasks == nil {
		tasks = make([]int, len(p.Tasks))
		for i := range tasks {
			tasks[i] = i
		}
	}
	slot := make(map[int]int, len(tasks))
	for k, i := range tasks {
		if i < 0 || i >= len(p.Tasks) {
			panic(fmt.Sprintf("runner: Execute: task index %d out of range [0, %d)", i, len(p.Tasks)))
		}
		if _, dup := slot[i]; dup {
			panic(fmt.Sprintf("runner: Execute: task %d listed twice", i))
		}
		slot[i] = k
	}
	units := p.UnitsOf(tasks)
	out := make([]TaskResult, len(tasks))
	grace := opt.Grace
	if grace == 0 {
		grace = DefaultGrace
	}

	// stop ends the starting of tasks (the caller's ctx, or a failure);
	// inFlight is the context of the tasks that run.
	stop, cancelStop := context.WithCancelCause(ctx)
	defer cancelStop(nil)
	inFlight, cancelTasks := context.WithCancelCause(context.Background())
	defer cancelTasks(nil)
	sv := newSaver(opt.Save, opt.SaveEvery, cancelStop)
	if sv != nil {
		sv.keep = opt.Keep
	}
	var mu sync.Mutex
	done, running := 0, 0
	totalFits := p.FitsOf(tasks)
	gaveUp := false
	abandoned := 0 // tasks in flight when they were abandoned
	abandon := func() {
		mu.Lock()
		abandoned = running
		mu.Unlock()
		cancelTasks(errAbandoned)
	}
	started := func() {
		mu.Lock()
		running++
		mu.Unlock()
	}
	finished := func(i int, r TaskResult) {
		mu.Lock()
		defer mu.Unlock()
		if gaveUp {
			return // Execute has returned: the result is dropped
		}
		running--
		out[slot[i]] = r
		sv.add(r)
		done += p.Fits(p.Tasks[i])
		if opt.Progress != nil {
			opt.Progress(done, totalFits)
		}
	}
	failed := func() {
		mu.Lock()
		running--
		mu.Unlock()
	}
	all := make(chan struct{})
	go func() {
		select {
		case <-stop.Done():
		case <-all:
			return
		}
		if ctx.Err() == nil {
			cancelTasks(context.Cause(stop)) // a failure: nothing to wait for
			return
		}
		var timer <-chan time.Time
		if grace > 0 {
			t := time.NewTimer(grace)
			defer t.Stop()
			timer = t.C
		} else {
			abandon()
			return
		}
		select {
		case <-timer:
		case <-opt.Abandon:
		case <-all:
			return
		}
		abandon()
	}()
	g := new(errgroup.Group)
	g.SetLimit(workers)
	// Few units (a large dataset's folds) would leave workers idle while
	// one unit runs its models one after the other: then every task is
	// its own piece of work, and the tasks of a unit share its prepared
	// split (sharedUnit).
	perTask := len(units) < splitUnits*workers
	go func() {
		defer close(all)
		for _, u := range units {
			if stop.Err() != nil {
				break
			}
			if perTask && len(u) > 1 {
				su := &sharedUnit{left: len(u)}
				for _, i := range u {
					g.Go(func() error {
						if err := stop.Err(); err != nil {
							return err
						}
						err := runShared(stop, inFlight, p, su, u[0], i, len(u), started, finished, failed)
						if err != nil && stop.Err() == nil {
							cancelStop(err)
						}
						return err
					})
				}
				continue
			}
			g.Go(func() error {
				if err := stop.Err(); err != nil {
					return err
				}
				err := runUnit(stop, inFlight, p, u, started, finished, failed)
				if err != nil && stop.Err() == nil {
					cancelStop(err)
				}
				return err
			})
		}
		g.Wait()
	}()
	select {
	case <-all:
	case <-inFlight.Done():
		select {
		case <-all:
		case <-time.After(settle):
		}
	}
	mu.Lock()
	gaveUp = true
	mu.Unlock()
	saveErr := sv.close(ctx.Err() == nil && context.Cause(stop) == nil)
	cause := context.Cause(stop)
	switch {
	case ctx.Err() != nil:
		return nil, &InterruptedError{Abandoned: abandoned, Grace: grace, Err: ctx.Err()}
	case saveErr != nil:
		return nil, saveErr
	case cause != nil:
		return nil, cause
	}
	return out, nil
}

// saver batches finished results and hands them to a Save function from
// one goroutine, at least every interval and once at close.
type saver struct {
	save    func([]TaskResult) error
	fail    context.CancelCauseFunc
	mu      sync.Mutex
	pending []TaskResult
	err     error
	stop    chan struct{}
	done    chan struct{}
	// keep receives what is pending at close after a successful run
	// instead of save (Options.Keep).
	keep     func([]TaskResult)
	keepLast bool // set by close: the last batch goes to keep
}

func newSaver(save func([]TaskResult) error, every time.Duration, fail context.CancelCauseFunc) *saver {
	if save == nil {
		return nil
	}
	if every <= 0 {
		every = DefaultSaveEvery
	}
	s := &saver{save: save, fail: fail, stop: make(chan struct{}), done: make(chan struct{})}
	go func() {
		defer close(s.done)
		tick := time.NewTicker(every)
		defer tick.Stop()
		for {
			select {
			case <-tick.C:
				s.flush()
			case <-s.stop:
				s.mu.Lock()
				keep := s.keepLast
				s.mu.Unlock()
				if keep {
					s.mu.Lock()
					batch := s.pending
					s.pending = nil
					s.mu.Unlock()
					sort.Slice(batch, func(a, b int) bool { return batch[a].Task.Index < batch[b].Task.Index })
					s.keep(batch)
				} else {
					s.flush()
				}
				return
			}
		}
	}()
	return s
}

func (s *saver) add(r TaskResult) {
	if s == nil {
		return
	}
	s.mu.Lock()
	s.pending = append(s.pending, r)
	s.mu.Unlock()
}

// flush hands the pending results to save (only ever from the saver's
// goroutine, so batches are written one at a time).
func (s *saver) flush() {
	s.mu.Lock()
	batch := s.pending
	s.pending = nil
	failed := s.err != nil
	s.mu.Unlock()
	if len(batch) == 0 || failed {
		return
	}
	sort.Slice(batch, func(a, b int) bool { return batch[a].Task.Index < batch[b].Task.Index })
	if err := s.save(batch); err != nil {
		err = fmt.Errorf("save finished tasks: %w", err)
		s.mu.Lock()
		s.err = err
		s.mu.Unlock()
		s.fail(err)
	}
}

// close flushes what is pending (to keep instead, when the run succeeded
// and keep is set) and returns the first save error.
func (s *saver) close(succeeded bool) error {
	if s == nil {
		return nil
	}
	s.mu.Lock()
	s.keepLast = s.keep != nil && succeeded && s.err == nil
	s.mu.Unlock()
	close(s.stop)
	<-s.done
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.err
}

// runUnit fits the unit's pipeline on the training part of its split,
// transforms both parts, and runs each of its tasks' models on them,
// handing each result to finished as soon as it is complete. No task
// starts once stop is done; models run with the context inFlight.
func runUnit(stop, inFlight context.Context, p *plan.Plan, unit []int, started func(), finished func(int, TaskResult), failed func()) error {
	start := time.Now()
	t0 := p.Tasks[unit[0]]
	pr, err := p.PrepareTask(t0)
	if err != nil {
		return err
	}
	shared := time.Since(start) / time.Duration(len(unit))
	for _, i := range unit {
		if err := stop.Err(); err != nil {
			return err
		}
		started()
		r, err := runTask(inFlight, p, i, pr, failed)
		if err != nil {
			return err
		}
		r.Elapsed += shared
		finished(i, r)
	}
	return nil
}

// splitUnits: with fewer than splitUnits units per worker, Execute runs
// every task as its own piece of work (see sharedUnit). With the 5 units
// of a 5-fold run and two workers, whole units could keep both busy for at
// most 5/3 of the time of one; tasks of four models keep them busy to the
// end (the 50,000-row run of scripts/speed/scale.sh). With hundreds of
// units (the speed grid), units are kept: their tasks would otherwise
// wait for each other's pipeline.
const splitUnits = 8

// sharedUnit is the prepared split of a unit whose tasks run as pieces of
// work of their own: the first of them to start prepares it (the others
// wait for it), the last to finish lets it go.
type sharedUnit struct {
	once sync.Once
	pr   *plan.Prepared
	err  error
	took time.Duration // preparing it

	mu   sync.Mutex
	left int // tasks not finished
}

// get prepares the unit once (its first task's split, as runUnit does).
func (su *sharedUnit) get(p *plan.Plan, first plan.Task) (*plan.Prepared, time.Duration, error) {
	su.once.Do(func() {
		start := time.Now()
		su.pr, su.err = p.PrepareTask(first)
		su.took = time.Since(start)
	})
	return su.pr, su.took, su.err
}

// release counts a finished task and drops the prepared split after the
// last one, so that its memory is not held to the end of the run.
func (su *sharedUnit) release() {
	su.mu.Lock()
	defer su.mu.Unlock()
	if su.left--; su.left == 0 {
		su.pr = nil
	}
}

// runShared runs task i of a unit of n tasks whose first task is first,
// on the unit's shared prepared split, as runUnit runs each of its tasks:
// its Elapsed includes a 1/n share of the preparation.
func runShared(stop, inFlight context.Context, p *plan.Plan, su *sharedUnit, first, i, n int, started func(), finished func(int, TaskResult), failed func()) error {
	defer su.release()
	pr, took, err := su.get(p, p.Tasks[first])
	if err != nil {
		return err
	}
	if err := stop.Err(); err != nil {
		return err
	}
	started()
	r, err := runTask(inFlight, p, i, pr, failed)
	if err != nil {
		return err
	}
	r.Elapsed += took / time.Duration(n)
	finished(i, r)
	return nil
}

// contextDetailer is a Detailer that stops when its context is done (the
// interference classifier: between gates and rows).
type contextDetailer interface {
	PredictDetailContext(ctx context.Context, X *mat.Dense) ([]int, []qkernel.Detail, error)
}

// runTask runs task i on its prepared split (runModel); on an error it
// calls failed and returns the error, bad input as it is and anything
// else with the task's key.
func runTask(ctx context.Context, p *plan.Plan, i int, pr *plan.Prepared, failed func()) (TaskResult, error) {
	r, err := runModel(ctx, p, p.Tasks[i], pr)
	if err != nil {
		failed()
		if errors.Is(err, input.ErrBad) {
			return TaskResult{}, err
		}
		return TaskResult{}, fmt.Errorf("task %s: %w", p.Key(p.Tasks[i]), err)
	}
	return r, nil
}

// runModel fits one task's model on the prepared (transformed) training
// part of its split and predicts the prepared test part. A tuned model is
// first tuned by inner cross-validation on the training part (tune), and
// the chosen configuration is fitted on the whole training part.
func runModel(ctx context.Context, p *plan.Plan, t plan.Task, pr *plan.Prepared) (TaskResult, error) {
	start := time.Now()
	d := p.Datasets[t.Dataset]
	sp := d.Splits[t.Split]
	ms := p.Spec.Models[t.Model]
	var tuning *Tuning
	if ms.Grid != nil {
		var err error
		if tuning, err = tune(ctx, p, t, pr); err != nil {
			return TaskResult{}, err
		}
		ms = ms.Grid.Points[tuning.Chosen].Spec
		ms.Name = p.Spec.Models[t.Model].Name
	}
	fp, err := fitPredict(ctx, p, t, ms, p.ModelSeed(t), pr)
	if err != nil {
		return TaskResult{}, err
	}
	if len(fp.pred) != len(sp.Test) {
		return TaskResult{}, fmt.Errorf("model %s returned %d predictions for %d test instances", ms.Name, len(fp.pred), len(sp.Test))
	}
	r := TaskResult{Task: t, NTrain: len(p.TrainRows(t)), NTest: len(sp.Test), Pred: fp.pred, Details: fp.details, Tuning: tuning}
	if singleClass(r.Pred) && len(r.Pred) > 1 {
		// Only then are the decision values looked at (another pass of
		// the model over the test part).
		if dv, err := baselines.Decisions(fp.model, fp.zte); err == nil && dv != nil {
			r.ConstantDecision = constantRows(dv)
		}
	}
	truth := make([]int, len(sp.Test))
	for i, j := range sp.Test {
		truth[i] = d.Data.Y[j]
	}
	r.Scores = results.Score(truth, r.Pred, len(d.Data.Classes))
	r.Elapsed = time.Since(start)
	return r, nil
}

// fitted is one configuration fitted and applied: its predictions and
// details, the model and the test matrix it saw.
type fitted struct {
	pred    []int
	details []qkernel.Detail
	model   baselines.Model
	zte     *mat.Dense
}

// fitPredict fits the configuration ms (its own pipeline steps applied
// after pr's, fitted on pr's training part) with the model seed seed on
// pr's training part and predicts pr's test part.
func fitPredict(ctx context.Context, p *plan.Plan, t plan.Task, ms modelkit.Spec, seed uint64, pr *plan.Prepared) (fitted, error) {
	d := p.Datasets[t.Dataset]
	pr, err := p.Then(pr, t.Dataset, ms.Pipeline)
	if err != nil {
		return fitted{}, err
	}
	m := ms.New(seed)
	if ta, ok := m.(modelkit.TaskAware); ok {
		ta.SetTask(p.TaskContext(ctx, t, pr))
	}
	if err := m.Fit(pr.Ztr, pr.Ytr, len(d.Data.Classes)); err != nil {
		return fitted{}, p.ClassifyModel(err, pr.Where, ms.Name, pr.RowsTr)
	}
	f := fitted{model: m, zte: pr.Zte}
	if cm, ok := m.(contextDetailer); ok {
		f.pred, f.details, err = cm.PredictDetailContext(ctx, pr.Zte)
	} else if dm, ok := m.(modelkit.Detailer); ok {
		f.pred, f.details, err = dm.PredictDetail(pr.Zte)
	} else {
		f.pred, err = m.Predict(pr.Zte)
	}
	if err != nil {
		return fitted{}, p.ClassifyModel(err, pr.Where, ms.Name, pr.RowsTe)
	}
	return f, nil
}

// meanPAcc is the mean post-selection probability of a task's predictions,
// or NaN when the model reports none.
func meanPAcc(d []qkernel.Detail) float64 {
	if len(d) == 0 {
		return math.NaN()
	}
	s := 0.0
	for _, x := range d {
		s += x.PAcc
	}
	return s / float64(len(d))
}

// singleClass reports whether every prediction is the same class.
func singleClass(pred []int) bool {
	for _, c := range pred {
		if c != pred[0] {
			return false
		}
	}
	return true
}

// constantRows reports whether every row of m equals the first (exactly:
// a model that does not look at its input gives the same bits).
func constantRows(m *mat.Dense) bool {
	r, _ := m.Dims()
	for i := 1; i < r; i++ {
		if !floats.Equal(m.RawRowView(i), m.RawRowView(0)) {
			return false
		}
	}
	return true
}
