//go:build !linux

package external

import "os/exec"

// childAttrs leaves the child's attributes as they are where process groups
// are not set up the Linux way.
func childAttrs(cmd *exec.Cmd) {}

// killGroup kills the child.
func killGroup(cmd *exec.Cmd) { _ = cmd.Process.Kill() }
