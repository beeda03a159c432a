//go:build unix && !linux

package external

import (
	"os/exec"
	"syscall"
)

// ownGroup starts the program in a process group of its own and makes
// the time limit kill the whole group, so that children the program
// started do not outlive it. (Only Linux also kills the program when
// this process dies; see procgroup_linux.go.)
func ownGroup(cmd *exec.Cmd) {
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	cmd.Cancel = func() error {
		return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
}
