package holonomy

import (
	"math/rand/v2"
	"testing"
)

func TestQuickEig(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 1; n <= 16; n++ {
		h := NewMat(n, n)
		for i := 0; i < n; i++ {
			h.Set(i, i, complex(rng.NormFloat64(), 0))
			for j := i + 1; j < n; j++ {
				v := complex(rng.NormFloat64(), rng.NormFloat64())
				h.Set(i, j, v)
				h.Set(j, i, complex(real(v), -imag(v)))
			}
		}
		e := NewEigen(n)
		vals := make([]float64, n)
		v := NewMat(n, n)
		e.Factorize(h, vals, v)
		hv := NewMat(n, n)
		Mul(hv, h, v)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				hv.Data[i*n+j] -= v.Data[i*n+j] * complex(vals[j], 0)
			}
		}
		if r := FrobeniusNorm(hv); r > 1e-12 {
			t.Errorf("n=%d residual %g", n, r)
		}
		if u := UnitarityError(v); u > 1e-12 {
			t.Errorf("n=%d unitarity %g", n, u)
		}
	}
}
