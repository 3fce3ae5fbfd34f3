package device

import (
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// gaussianPi returns the samples of a Gaussian π pulse on 0↔1 of duration
// T (σ = T/4, shifted to zero at the ends and scaled to area π) on tone 0 of
// m, with the derivative-removal quadrature −β·Ω̇/α when beta ≠ 0, sampled
// at rate 1/dt.
func gaussianPi(m *Model, T, dt, alpha, beta float64) []holonomy.Point {
	sigma := T / 4
	g := func(t float64) float64 {
		return math.Exp(-(t-T/2)*(t-T/2)/(2*sigma*sigma)) - math.Exp(-T*T/(8*sigma*sigma))
	}
	// Area of g by a fine midpoint sum.
	var area float64
	const fine = 20000
	for i := 0; i < fine; i++ {
		area += g((float64(i)+0.5)*T/fine) * T / fine
	}
	amp := math.Pi / area
	env := func(t float64) float64 { return amp * g(t) }
	der := func(t float64) float64 {
		return -amp * (t - T/2) / (sigma * sigma) * math.Exp(-(t-T/2)*(t-T/2)/(2*sigma*sigma))
	}
	n := int(math.Round(T / dt))
	pts := make([]holonomy.Point, n)
	for j := range pts {
		pts[j] = m.NewPoint()
		tm := (float64(j) + 0.5) * dt
		pts[j].Drive[0] = complex(env(tm), -beta*der(tm)/alpha)
	}
	return pts
}

// leakage returns the population outside levels 0 and 1 after the samples,
// starting in |0⟩.
func leakage(t *testing.T, m *Model, pts []holonomy.Point, dt float64) float64 {
	u := holonomy.NewMat(m.Dim(), 1)
	u.Set(0, 0, 1)
	if err := NewSimulator(m).Propagate(u, pts, dt); err != nil {
		t.Fatal(err)
	}
	var p float64
	for k := 2; k < m.Dim(); k++ {
		p += real(u.At(k, 0) * cmplx.Conj(u.At(k, 0)))
	}
	return p
}

// Transmon ladder matrix elements: the charge operator couples j↔j+1 with
// ⟨j+1|n̂|j⟩ ∝ √(j+1) (Koch et al., Phys. Rev. A 76, 042319 (2007), eq. for
// the asymptotic matrix elements; from memory). The preset lists these
// factors on every tone, and a drive on 1↔2 alone (started in |1⟩) makes a
// full transfer to |2⟩ after a pulse of area π/√2, the Rabi frequency
// being √2 times the tone's drive.
func TestTransmonSqrtNElements(t *testing.T) {
	alpha := HzToRad(-220e6)
	d, err := Transmon(TransmonParams{Levels: 5, Omega01: HzToRad(5e9), Anharmonicity: alpha})
	if err != nil {
		t.Fatal(err)
	}
	for _, tone := range d.Tones {
		for _, c := range tone.Couplings {
			if c.Upper != c.Lower+1 || c.Factor != math.Sqrt(float64(c.Upper)) {
				t.Errorf("tone %s: coupling %d→%d factor %g, want √%d", tone.Name, c.Lower, c.Upper, c.Factor, c.Upper)
			}
		}
	}
	m := compile(t, d)
	omega := HzToRad(2e6) // weak against α so the off-resonant Stark shifts stay below 10⁻³
	dt := 1 / 2.4e9
	n := int(math.Round(math.Pi / (math.Sqrt2 * omega) / dt))
	pts := make([]holonomy.Point, n)
	for j := range pts {
		pts[j] = m.NewPoint()
		pts[j].Drive[1] = complex(math.Pi/(math.Sqrt2*float64(n)*dt), 0)
	}
	u := holonomy.NewMat(5, 1)
	u.Set(1, 0, 1)
	if err := NewSimulator(m).Propagate(u, pts, dt); err != nil {
		t.Fatal(err)
	}
	if p2 := real(u.At(2, 0) * cmplx.Conj(u.At(2, 0))); p2 < 0.999 {
		t.Errorf("π/√2-area pulse on w12 from |1⟩: P2 = %g, want ≈ 1", p2)
	}
}

// Leakage of a Gaussian π pulse on 0↔1 of a transmon into level 2, and its
// first-order removal by the derivative-removal (DRAG) quadrature
// Ω_y = −Ω̇_x/α (Motzoi, Gambetta, Rebentrost and Wilhelm, Phys. Rev. Lett.
// 103, 110501 (2009), first-order solution; sign for this package's
// e^{iφ}|u⟩⟨l| convention).
//
// First-order oracle: in the frame of the tone (levels 0, 1, 2 at their own
// energies) the tone at ω₀₁ couples 1↔2 with (√2/2)ε(t)e^{iαt}, ε the complex
// drive; with the qubit following the two-level solution c₁(t) =
// −i sin(θ(t)/2), θ = ∫Ω, the amplitude reaching |2⟩ is
//
//	c₂ = −(√2/2) ∫ ε(t) sin(θ(t)/2) e^{iαt} dt,
//
// computed here by quadrature over the same sampled envelope, independent of
// the simulator, for pulses of 20–28 ns (peak Ω/|α| ≤ 0.2, so the neglected
// orders stay below 10 %). With
// ε = Ω − iΩ̇/α an integration by parts leaves only (i/α)∫Ω·d(sin θ/2)/dt·
// e^{iαt}, one order of Ω/α smaller: the first-order leakage is removed,
// and the simulated leakage must fall at least tenfold.
func TestTransmonGaussianLeakageAndDRAG(t *testing.T) {
	alpha := HzToRad(-220e6)
	d, err := Transmon(TransmonParams{Levels: 4, Omega01: HzToRad(5e9), Anharmonicity: alpha})
	if err != nil {
		t.Fatal(err)
	}
	m := compile(t, d)
	dt := 1 / 2.4e9
	for _, T := range []float64{20e-9, 24e-9, 28e-9} {
		plain := gaussianPi(m, T, dt, alpha, 0)
		drag := gaussianPi(m, T, dt, alpha, 1)
		lp, ld := leakage(t, m, plain, dt), leakage(t, m, drag, dt)
		// First-order oracle by quadrature over the same zero-order-hold
		// envelope the simulator is given.
		var c2 complex128
		var theta float64
		const sub = 64
		h := dt / sub
		for j, p := range plain {
			om := real(p.Drive[0])
			for i := 0; i < sub; i++ {
				tm := float64(j)*dt + (float64(i)+0.5)*h
				th := theta + om*h/2
				c2 += complex(om*math.Sin(th/2)*h, 0) * cmplx.Rect(1, alpha*tm)
				theta += om * h
			}
		}
		c2 *= complex(-math.Sqrt2/2, 0)
		op := real(c2 * cmplx.Conj(c2))
		t.Logf("T = %g ns: leakage %.3g (first order %.3g), with DRAG %.3g", T*1e9, lp, op, ld)
		if lp < 1e-6 || math.Abs(lp-op) > 0.1*op {
			t.Errorf("T = %g ns: Gaussian leakage %g, first-order estimate %g", T*1e9, lp, op)
		}
		if ld > lp/10 {
			t.Errorf("T = %g ns: DRAG leakage %g not 10× below the plain pulse's %g", T*1e9, ld, lp)
		}
	}
}
