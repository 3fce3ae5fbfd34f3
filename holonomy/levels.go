package holonomy

import "math"

// ExcitedLevels returns, in increasing order, the levels of s that are not
// computational and are the upper level of at least one channel: the levels
// a drive populates on the way and from which decay and leakage come.
func (s *Scheme) ExcitedLevels() []int {
	comp := make(map[int]bool, len(s.Computational))
	for _, k := range s.Computational {
		comp[k] = true
	}
	var out []int
	for k := range s.Levels {
		if comp[k] {
			continue
		}
		for _, c := range s.Channels {
			if c.Upper == k {
				out = append(out, k)
				break
			}
		}
	}
	return out
}

// Finite reports whether x is neither NaN nor ±Inf.
func Finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func finite(x float64) bool { return Finite(x) }
