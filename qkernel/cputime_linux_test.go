package qkernel

import (
	"syscall"
	"time"
	"unsafe"
)

// threadCPU returns the CPU time of the calling OS thread
// (clock_gettime(CLOCK_THREAD_CPUTIME_ID)), as sim.Calibrate measures.
func threadCPU() time.Duration {
	var ts syscall.Timespec
	syscall.Syscall(syscall.SYS_CLOCK_GETTIME, 3, uintptr(unsafe.Pointer(&ts)), 0)
	return time.Duration(ts.Nano())
}
