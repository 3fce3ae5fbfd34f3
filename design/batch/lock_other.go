//go:build !unix

package batch

// lockDir takes no lock on systems without flock: do not run two runs of
// one work folder at once there.
func lockDir(dir string) (unlock func(), busy bool, err error) { return func() {}, false, nil }

// peakMemory is not measured on systems without getrusage.
func peakMemory() int64 { return 0 }
