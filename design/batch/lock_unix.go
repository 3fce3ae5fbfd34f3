//go:build unix

package batch

import (
	"errors"
	"os"
	"runtime"
	"syscall"
)

// lockDir takes an exclusive, non-blocking lock on the folder dir (flock
// on its descriptor). It reports busy when another process holds it. The
// kernel drops the lock when the holder exits, however it exits. On a
// file system without locks it takes none.
func lockDir(dir string) (unlock func(), busy bool, err error) {
	f, err := os.Open(dir)
	if err != nil {
		return nil, false, err
	}
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		f.Close()
		switch {
		case errors.Is(err, syscall.EWOULDBLOCK):
			return nil, true, nil
		case errors.Is(err, syscall.ENOLCK), errors.Is(err, syscall.EOPNOTSUPP), errors.Is(err, syscall.ENOSYS), errors.Is(err, syscall.EINVAL):
			// A file system without locks (some Lustre or NFS mounts):
			// go on unlocked. Two runs may then do a task twice; the
			// first rename wins and the other result is dropped.
			return func() {}, false, nil
		}
		return nil, false, err
	}
	return func() { f.Close() }, false, nil
}

// peakMemory returns the process's peak resident memory in bytes.
func peakMemory() int64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	if runtime.GOOS == "darwin" {
		return int64(ru.Maxrss) // bytes on macOS
	}
	return int64(ru.Maxrss) * 1024 // kilobytes on Linux and the BSDs
}
