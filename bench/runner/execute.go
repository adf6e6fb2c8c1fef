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

	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/bench/plan"
	"fringe/qkernel"
	"fringe/results"
)

// Options configure the execution of a plan.
type Options struct {
	Workers  int                   // concurrent tasks; 0 means runtime.NumCPU()
	Progress func(done, total int) // called after each finished task (serialised; done counts this call's tasks); may be nil

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
}

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
}

// Execute runs the tasks of the plan (all, or opt.Tasks) on a worker pool
// and returns their results in the order of opt.Tasks (task order when
// opt.Tasks is nil). Each task gets its own generator seed derived from the
// run seed and the task key, so results do not depend on the number of
// workers, on scheduling, or on which other tasks run in the same process.
// On the first error (or when ctx is cancelled) tasks not yet started are
// skipped, tasks in flight finish (models are not interruptible), finished
// ones are handed to opt.Save, and the error is returned; errors caused by
// the input satisfy errors.Is(err, input.ErrBad).
//
// Tasks that share a dataset, pipeline and split are scheduled together as
// one unit of work, so the pipeline is fitted and applied once for all the
// models of that split; models never modify their input matrices.
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

	runCtx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)
	sv := newSaver(opt.Save, opt.SaveEvery, cancel)
	var mu sync.Mutex
	done := 0
	finished := func(i int, r TaskResult) {
		out[slot[i]] = r
		sv.add(r)
		mu.Lock()
		done++
		if opt.Progress != nil {
			opt.Progress(done, len(tasks))
		}
		mu.Unlock()
	}
	g, gctx := errgroup.WithContext(runCtx)
	g.SetLimit(workers)
	for _, u := range units {
		if gctx.Err() != nil {
			break
		}
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			return runUnit(gctx, p, u, finished)
		})
	}
	err := g.Wait()
	saveErr := sv.close()
	switch {
	case ctx.Err() != nil:
		return nil, ctx.Err()
	case saveErr != nil:
		return nil, saveErr
	case err != nil:
		return nil, err
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
				s.flush()
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

// close flushes what is pending and returns the first save error.
func (s *saver) close() error {
	if s == nil {
		return nil
	}
	close(s.stop)
	<-s.done
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.err
}

// runUnit fits the unit's pipeline on the training part of its split,
// transforms both parts, and runs each of its tasks' models on them,
// handing each result to finished as soon as it is complete.
func runUnit(ctx context.Context, p *plan.Plan, unit []int, finished func(int, TaskResult)) error {
	start := time.Now()
	t0 := p.Tasks[unit[0]]
	pr, err := p.Prepare(t0.Dataset, t0.Pipeline, t0.Split)
	if err != nil {
		return err
	}
	shared := time.Since(start) / time.Duration(len(unit))
	for _, i := range unit {
		if err := ctx.Err(); err != nil {
			return err
		}
		r, err := runModel(ctx, p, p.Tasks[i], pr)
		if err != nil {
			if errors.Is(err, input.ErrBad) {
				return err
			}
			return fmt.Errorf("task %s: %w", p.Key(p.Tasks[i]), err)
		}
		r.Elapsed += shared
		finished(i, r)
	}
	return nil
}

// runModel fits one task's model on the prepared (transformed) training
// part of its split and predicts the prepared test part.
func runModel(ctx context.Context, p *plan.Plan, t plan.Task, pr *plan.Prepared) (TaskResult, error) {
	start := time.Now()
	d := p.Datasets[t.Dataset]
	sp := d.Splits[t.Split]
	ms := p.Spec.Models[t.Model]
	m := ms.New(p.ModelSeed(t))
	if ta, ok := m.(modelkit.TaskAware); ok {
		ta.SetTask(p.TaskContext(ctx, t, pr))
	}
	if err := m.Fit(pr.Ztr, pr.Ytr, len(d.Data.Classes)); err != nil {
		return TaskResult{}, p.ClassifyModel(err, pr.Where, ms.Name, pr.RowsTr)
	}
	r := TaskResult{Task: t, NTrain: len(sp.Train), NTest: len(sp.Test)}
	var err error
	if dm, ok := m.(modelkit.Detailer); ok {
		r.Pred, r.Details, err = dm.PredictDetail(pr.Zte)
	} else {
		r.Pred, err = m.Predict(pr.Zte)
	}
	if err != nil {
		return TaskResult{}, p.ClassifyModel(err, pr.Where, ms.Name, pr.RowsTe)
	}
	if len(r.Pred) != len(sp.Test) {
		return TaskResult{}, fmt.Errorf("model %s returned %d predictions for %d test instances", ms.Name, len(r.Pred), len(sp.Test))
	}
	truth := make([]int, len(sp.Test))
	for i, j := range sp.Test {
		truth[i] = d.Data.Y[j]
	}
	r.Scores = results.Score(truth, r.Pred, len(d.Data.Classes))
	r.Elapsed = time.Since(start)
	return r, nil
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
