//go:build unix

package holonomy

import (
	"syscall"
	"time"
)

// geoProcessCPU returns the CPU time (user + system) used by the process so
// far. Benchmarks report it per loop point besides the wall-clock time, which
// on a shared machine also counts the time other processes hold the core.
func geoProcessCPU() (time.Duration, bool) {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0, false
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano()), true
}
