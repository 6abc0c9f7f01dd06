//go:build !unix

package plumb

import "os/exec"

// stopGroup leaves the default cancellation (the program itself is
// killed) where there are no process groups.
func stopGroup(cmd *exec.Cmd) {}
