//go:build unix

package modelkit

import (
	"os/exec"
	"syscall"
)

// ownProcessGroup starts the command in a process group of its own and
// makes cancellation kill the whole group, so that a program that started
// helpers of its own (a shell script running python, say) stops with them
// when its timeout passes or the run stops.
func ownProcessGroup(cmd *exec.Cmd) {
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	cmd.Cancel = func() error {
		return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
}
