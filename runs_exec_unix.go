//go:build unix

package plumb

import (
	"os/exec"
	"syscall"
)

// stopGroup puts the program in a process group of its own and makes its
// cancellation kill the whole group, so that a script's children stop too.
func stopGroup(cmd *exec.Cmd) {
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	cmd.Cancel = func() error {
		if cmd.Process == nil {
			return nil
		}
		return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
}
