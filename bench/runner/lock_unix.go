//go:build unix

package runner

import (
	"errors"
	"os"
	"syscall"
)

// lockFile takes an exclusive advisory lock (flock) on the file at path.
// The lock is held until the returned file is closed or the process ends,
// so it never outlives a killed run. It returns errInUse when another
// process holds the lock, and (nil, nil) on a file system without flock
// support, where runs are simply not protected from each other.
func lockFile(path string) (*os.File, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	for {
		err = syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB)
		if !errors.Is(err, syscall.EINTR) {
			break
		}
	}
	if err != nil {
		f.Close()
		if errors.Is(err, syscall.EWOULDBLOCK) {
			return nil, errInUse
		}
		return nil, nil
	}
	return f, nil
}
