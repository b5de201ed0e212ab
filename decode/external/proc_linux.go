package external

import (
	"os/exec"
	"syscall"
)

// childAttrs puts the child in a process group of its own (so a terminal's
// SIGINT reaches kweigh, which stops the child itself) and has the kernel
// kill it if kweigh dies first.
func childAttrs(cmd *exec.Cmd) {
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true, Pdeathsig: syscall.SIGKILL}
}

// killGroup kills the child's process group.
func killGroup(cmd *exec.Cmd) {
	_ = syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
}
