package runner

import (
	"math"
	"runtime/debug"
)

// Garbage collection of a run.
//
// The Go runtime collects when the heap has grown by GOGC percent (100 by
// default) over what the last collection kept. A run of small tasks keeps
// little (tens of megabytes) and allocates fast, so it collects dozens of
// times a second, each time taking a share of the processors from the
// tasks and handing pages back to the system to fault them in again; on
// the speed grid (scripts/speed/ratio.sh) this took about half of the wall
// time with two workers (measured: 0.83 s at GOGC=100, 0.42 s at 400 and
// 0.43 s at 800, median of 9 interleaved runs). The memory estimates of
// the plan (plan.TaskMemory, SVM.MemoryBytes) assume GOGC=100, that is a
// heap of up to twice what is in use, so a higher GOGC is only safe where
// the estimate is small.

// GCFloor is the heap a run may grow to before the garbage collector
// runs more often than GOGC=100 would have it (SetGC): 256 MiB.
const GCFloor = 256 << 20

// gcMax is the largest GOGC SetGC chooses.
const gcMax = 400

// SetGC sets the garbage collector for a run whose plan estimates need
// bytes at most (plan.Plan.MemoryNeed: the workers' tasks and the loaded
// data, with the headroom of GOGC=100, so about need/2 in use) under the
// memory limit limit (the command's -memory). GOGC becomes the value that
// lets a heap of need/2 in use grow to GCFloor before a collection,
// 100 (unchanged) when the run is large enough for the heap to reach the
// floor anyway, at most gcMax; and the runtime's soft memory limit is set
// to limit, so that the collector runs harder rather than let the heap
// pass it. It returns a function that restores the previous settings. It
// changes no output: collection only decides when memory is reused.
func SetGC(need, limit int64) (restore func()) {
	percent := 100
	if live := float64(max(need, 1)) / 2; live < GCFloor {
		percent = int(math.Min(gcMax, math.Max(100, 100*(GCFloor/live-1))))
	}
	oldPercent := debug.SetGCPercent(percent)
	oldLimit := debug.SetMemoryLimit(-1)
	if limit > 0 {
		debug.SetMemoryLimit(limit)
	}
	return func() {
		debug.SetGCPercent(oldPercent)
		debug.SetMemoryLimit(oldLimit)
	}
}
