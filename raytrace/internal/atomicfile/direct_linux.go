package atomicfile

import (
	"os"
	"syscall"
)

const directFlag = syscall.O_DIRECT

// clearDirect turns direct writes off on f.
func clearDirect(f *os.File) error {
	raw, err := f.SyscallConn()
	if err != nil {
		return err
	}
	var serr error
	err = raw.Control(func(fd uintptr) {
		flags, _, errno := syscall.Syscall(syscall.SYS_FCNTL, fd, syscall.F_GETFL, 0)
		if errno == 0 {
			_, _, errno = syscall.Syscall(syscall.SYS_FCNTL, fd, syscall.F_SETFL, flags&^syscall.O_DIRECT)
		}
		if errno != 0 {
			serr = errno
		}
	})
	if err != nil {
		return err
	}
	return serr
}
