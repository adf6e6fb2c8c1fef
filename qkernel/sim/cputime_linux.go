package sim

import (
	"syscall"
	"time"
	"unsafe"
)

// threadCPU returns the CPU time of the calling OS thread
// (clock_gettime(CLOCK_THREAD_CPUTIME_ID)), which a busy machine does not
// inflate; the caller locks its goroutine to the thread. It falls back to
// the wall clock if the call fails.
func threadCPU() time.Duration {
	const clockThreadCPUTimeID = 3 // <time.h>
	var ts syscall.Timespec
	if _, _, e := syscall.Syscall(syscall.SYS_CLOCK_GETTIME, clockThreadCPUTimeID, uintptr(unsafe.Pointer(&ts)), 0); e != 0 {
		return time.Duration(time.Now().UnixNano())
	}
	return time.Duration(ts.Nano())
}
