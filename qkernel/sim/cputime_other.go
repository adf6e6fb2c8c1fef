//go:build !linux

package sim

import "time"

// threadCPU returns the wall clock where no per-thread CPU clock is used.
func threadCPU() time.Duration { return time.Duration(time.Now().UnixNano()) }
