//go:build !unix

package modelkit

import "os/exec"

// ownProcessGroup leaves the command as it is: without process groups,
// cancellation kills the program itself (exec.CommandContext's default),
// not helpers it started.
func ownProcessGroup(cmd *exec.Cmd) {}
