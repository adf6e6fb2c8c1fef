//go:build !linux

package qkernel

import "time"

func threadCPU() time.Duration { return time.Duration(time.Now().UnixNano()) }
