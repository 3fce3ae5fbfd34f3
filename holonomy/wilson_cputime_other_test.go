//go:build !unix

package holonomy

import "time"

// geoProcessCPU is not available on this system.
func geoProcessCPU() (time.Duration, bool) { return 0, false }
