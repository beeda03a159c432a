package external

import (
	"os/exec"
	"syscall"
)

// ownGroup starts the program in a process group of its own and makes
// the time limit kill the whole group, so that children the program
// started do not outlive it; and the kernel kills the program when this
// process dies (Pdeathsig), so that a killed run or session leaves no
// program running. Children the program itself starts are the program's
// to end when it is killed (a shell script should exec its last command).
func ownGroup(cmd *exec.Cmd) {
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true, Pdeathsig: syscall.SIGKILL}
	cmd.Cancel = func() error {
		return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
}
