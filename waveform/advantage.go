package waveform

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopgate/loopgate/holonomy"
)

// DynamicalPulse is the decomposition of a single-qubit gate used by the
// plain dynamical gate:
//
//	U = e^{iγ} R_z(ZAngle) · R_Phase(Area),
//	R_φ(θ) = exp(−i(θ/2)(cosφ σ_x + sinφ σ_y)),  R_z(α) = exp(−i(α/2)σ_z),
//
// in the basis (|0⟩, |1⟩) of the qubit levels. R_φ(θ) is a resonant pulse
// of area ∫Ω dt = θ and drive phase φ on the qubit transition (with
// loopgate's convention, the drive Ω e^{iφ}|1⟩⟨0|/2 + h.c. gives exactly
// this rotation); R_z(α) is a change of the phase reference of all later
// pulses ("virtual z rotation", McKay et al., Phys. Rev. A 96, 022330
// (2017)), which takes no time and is exact. Every SU(2) element has this
// form: R_z(α)R_φ(θ) = R_z(α+φ)R_x(θ)R_z(−φ) is the z-x-z Euler
// decomposition with independent outer angles.
type DynamicalPulse struct {
	// Area is the rotation angle θ ∈ [0, π], the pulse area in rad.
	Area float64
	// Phase is the drive phase φ ∈ (−π, π] in rad: the rotation axis is
	// (cos φ, sin φ, 0).
	Phase float64
	// ZAngle is the virtual z rotation α ∈ (−π, π] applied after the
	// pulse, in rad.
	ZAngle float64
}

// String describes the decomposition in words.
func (p DynamicalPulse) String() string {
	return fmt.Sprintf("resonant pulse of area %.4gπ and phase %.4gπ, then a virtual z rotation by %.4gπ",
		inPi(p.Area), inPi(p.Phase), inPi(p.ZAngle))
}

// inPi returns x/π with rounding noise (and −0) shown as 0.
func inPi(x float64) float64 {
	v := x / math.Pi
	if math.Abs(v) < 1e-12 {
		return 0
	}
	return v
}

// Unitary returns R_z(ZAngle)·R_Phase(Area) as a new 2×2 matrix.
func (p DynamicalPulse) Unitary() *holonomy.Mat {
	s, c := math.Sincos(p.Area / 2)
	ep := cmplx.Rect(1, p.Phase)
	za := cmplx.Rect(1, -p.ZAngle/2) // e^{−iα/2}
	r := []complex128{
		complex(c, 0), complex(0, -s) * cmplx.Conj(ep),
		complex(0, -s) * ep, complex(c, 0),
	}
	return holonomy.NewMatFrom(2, 2, []complex128{
		za * r[0], za * r[1],
		cmplx.Conj(za) * r[2], cmplx.Conj(za) * r[3],
	})
}

// DecomposeQubit returns the DynamicalPulse of the 2×2 unitary u (up to a
// global phase). It returns an error if u is not 2×2 or not unitary to
// 1e-9 in the Frobenius norm.
func DecomposeQubit(u *holonomy.Mat) (DynamicalPulse, error) {
	if u == nil || u.R != 2 || u.C != 2 {
		return DynamicalPulse{}, errors.New("dynamical gate: the target must be a 2×2 (single-qubit) unitary")
	}
	if e := holonomy.UnitarityError(u); !(e <= 1e-9) {
		return DynamicalPulse{}, fmt.Errorf("dynamical gate: the target is not unitary: ‖U†U − I‖ = %.3g (tolerance 1e-9)", e)
	}
	// Remove the global phase: V = U/√det U ∈ SU(2) = [[a, −b*], [b, a*]].
	det := u.At(0, 0)*u.At(1, 1) - u.At(0, 1)*u.At(1, 0)
	g := cmplx.Sqrt(det)
	a, b := u.At(0, 0)/g, u.At(1, 0)/g
	// R_z(α)R_φ(θ) has a = e^{−iα/2}cos(θ/2), b = −i e^{i(α/2+φ)} sin(θ/2).
	var p DynamicalPulse
	p.Area = 2 * math.Atan2(cmplx.Abs(b), cmplx.Abs(a))
	if cmplx.Abs(a) > 1e-12 {
		p.ZAngle = -2 * cmplx.Phase(a)
	}
	if cmplx.Abs(b) > 1e-12 {
		p.Phase = cmplx.Phase(b) + math.Pi/2 - p.ZAngle/2
	}
	p.ZAngle = wrapAngle(p.ZAngle)
	p.Phase = wrapAngle(p.Phase)
	return p, nil
}

// wrapAngle maps x to (−π, π].
func wrapAngle(x float64) float64 {
	x = math.Remainder(x, 2*math.Pi)
	if x <= -math.Pi {
		x += 2 * math.Pi
	}
	return x
}

// Dynamical is the plain dynamical gate that a geometric gate is compared
// with; see NewDynamical.
type Dynamical struct {
	// Waveform is the sampled, quantised pulse on the two-level scheme.
	// Its Target is R_z(ZAngle)†·U_target: evaluating the pulse against
	// it is the same as evaluating pulse-then-virtual-z against U_target.
	Waveform *Waveform
	// Pulse is the decomposition of the target.
	Pulse DynamicalPulse
	// Channel is the index of the geometric gate's channel whose Rabi
	// limit and DAC calibration the pulse uses.
	Channel int
}

// String describes the dynamical gate in words, for reports.
func (d *Dynamical) String() string {
	w := d.Waveform
	if w.Len() == 0 {
		return fmt.Sprintf("no pulse: the target is diagonal and is a virtual z rotation by %.4gπ on the %s–%s qubit",
			inPi(d.Pulse.ZAngle), w.Scheme.Levels[0].Name, w.Scheme.Levels[1].Name)
	}
	return fmt.Sprintf("%s on the %s–%s transition driven directly (sin² envelope, peak Rabi limit %.4g MHz, %.4g GS/s, %d samples)",
		d.Pulse, w.Scheme.Levels[0].Name, w.Scheme.Levels[1].Name,
		w.Hardware.MaxRabi[0]/1e6, w.Hardware.SampleRate/1e9, w.Len())
}

// NewDynamical builds the plain dynamical gate for the same target and
// hardware limits as the geometric gate geo, which must act on a qubit.
//
// The comparison qubit is a two-level scheme: the two qubit levels of geo
// (same names), joined by one channel with matrix-element factor 1, no
// static detunings. The target U is decomposed as R_z(α)·R_φ(θ)
// (DecomposeQubit); R_φ(θ) is one resonant pulse built by Build as a
// Cyclic segment of area θ with the drive phase φ — a sin² envelope, the
// same pulse shape loopgate uses for cyclic geometric gates, as short as
// the Rabi and slew limits allow, its sampled area exact before DAC
// rounding — and R_z(α) is a virtual z rotation (exact, no pulse). The
// hardware is geo's, restricted to one channel: the channel with the
// highest Rabi limit (its DAC full scale too), so the comparison pulse is
// the fastest the hardware allows. The sample rate, slew limit, DAC
// resolution, granularity and duration limits are unchanged.
//
// A diagonal target (θ = 0, e.g. Z, S, T) needs no pulse at all: the
// dynamical gate is then a waveform of zero samples, and its fidelity is 1
// under every error of the sweep axes.
func NewDynamical(geo *Waveform) (*Dynamical, error) {
	sc := geo.Scheme
	if len(sc.Computational) != 2 {
		return nil, fmt.Errorf("dynamical gate: the geometric gate acts on %d levels; the comparison needs a qubit", len(sc.Computational))
	}
	pulse, err := DecomposeQubit(geo.Target)
	if err != nil {
		return nil, err
	}
	best := 0
	for c, v := range geo.Hardware.MaxRabi {
		if v > geo.Hardware.MaxRabi[best] {
			best = c
		}
	}
	hw := geo.Hardware.clone()
	hw.MaxRabi = []float64{geo.Hardware.MaxRabi[best]}
	hw.FullScale = []float64{geo.Hardware.FullScale[best]}
	q := &holonomy.Scheme{
		Name: "qubit",
		Levels: []holonomy.Level{
			{Name: sc.Levels[sc.Computational[0]].Name},
			{Name: sc.Levels[sc.Computational[1]].Name},
		},
		Channels:      []holonomy.Channel{{Name: "q", Lower: 0, Upper: 1, Factor: 1}},
		Computational: []int{0, 1},
	}
	// Target of the pulse alone: R_z(α)†·U.
	rz := holonomy.NewMatFrom(2, 2, []complex128{cmplx.Rect(1, pulse.ZAngle/2), 0, 0, cmplx.Rect(1, -pulse.ZAngle/2)})
	target := holonomy.NewMat(2, 2)
	holonomy.Mul(target, rz, geo.Target)
	d := &Dynamical{Pulse: pulse, Channel: best}
	if pulse.Area < 1e-12 {
		d.Waveform = emptyWaveform(q, target, hw, geo.MinFidelity)
		return d, nil
	}
	drive := cmplx.Rect(1, pulse.Phase)
	plan := &Plan{
		Scheme: q,
		Target: target,
		Segments: []Segment{{
			Kind:  Cyclic,
			Shape: func(_ float64, p holonomy.Point) { p.Drive[0] = drive },
			Area:  pulse.Area,
		}},
		MinFidelity: geo.MinFidelity,
	}
	w, err := Build(plan, hw)
	if err != nil {
		return nil, fmt.Errorf("dynamical gate: %w", err)
	}
	d.Waveform = w
	return d, nil
}

// emptyWaveform returns a waveform of zero samples on the one-channel
// scheme q: the dynamical gate of a diagonal target.
func emptyWaveform(q *holonomy.Scheme, target *holonomy.Mat, hw Hardware, minF float64) *Waveform {
	sc, hz := CanonScheme(q)
	return &Waveform{
		Scheme:      sc,
		Target:      target,
		Hardware:    hw,
		MinFidelity: minF,
		I:           [][]float64{{}},
		Q:           [][]float64{{}},
		CodeI:       [][]int32{{}},
		CodeQ:       [][]int32{{}},
		Detuning:    make([][]float64, len(sc.Levels)),
		LevelHz:     hz,
	}
}

// AdvantageRow compares the geometric and the dynamical gate along one
// error axis.
type AdvantageRow struct {
	// Axis is the error axis.
	Axis Axis
	// Geometric and Dynamical are the robust regions of the two gates
	// (fidelity ≥ the comparison's threshold), edges refined by
	// simulation.
	Geometric, Dynamical Width
	// Ratio is Geometric.Width/Dynamical.Width: above 1 the geometric
	// gate tolerates a larger error. It is +Inf when only the dynamical
	// width is zero and NaN when both are.
	Ratio float64
	// Note qualifies the numbers (open edges, a pulse-free dynamical
	// gate); empty when there is nothing to add.
	Note string
}

// Comparison is the geometric-advantage comparison made by Compare.
type Comparison struct {
	// Threshold is the fidelity defining the robust region.
	Threshold float64
	// Dynamical is the plain dynamical gate.
	Dynamical *Dynamical
	// Rows holds one row per compared axis, in the order of the ranges.
	Rows []AdvantageRow
	// Geometric and DynamicalSweeps hold the sweeps of the two gates over
	// the given ranges, in the same order.
	Geometric, DynamicalSweeps []*Sweep
}

// Edge searches beyond the swept range extend at most this many times the
// range's extent on that side (and never past |ε| = maxEdgeAmplitude).
const (
	edgeSearchFactor = 64
	maxEdgeAmplitude = 0.95
	edgeRelTol       = 1e-6
	edgeMaxIter      = 60
)

// Compare builds the dynamical gate for geo (NewDynamical), sweeps both
// gates over each range (AmplitudeAxis and TwoPhotonAxis; the one-photon
// detuning has no counterpart in a directly driven qubit and is refused)
// and measures the robust region of each along each axis.
//
// Both gates see the same error model: the options' base model with the
// swept field replaced, except that per-channel amplitude errors are
// dropped for the dynamical gate (it has one channel). The amplitude error
// ε is the same relative scale error for both; the detuning δ is the same
// qubit-frequency error for both (see TwoPhotonAxis).
//
// Widths: a first bracket for each edge comes from the sweep as in
// Sweep.Width. If the sweep never leaves the robust region on a side, the
// search steps outwards, doubling the distance from zero each time, up to
// 64 times the range's extent on that side (|ε| ≤ 0.95 for the amplitude);
// an edge not found there is reported open at that limit. Each bracketed
// edge is then located by simulation with the Illinois variant of regula
// falsi (Dowell and Jarratt, BIT 11, 168 (1971)) on q(x) − q*, q = √(1 − F),
// q* = √(1 − threshold), to a relative tolerance of 1e-6. Simulations run
// in parallel as in SweepAxis and the result does not depend on the
// number of workers.
func Compare(ctx context.Context, geo *Waveform, ranges []Range, opt *SweepOptions) (*Comparison, error) {
	if len(ranges) == 0 {
		return nil, errors.New("geometric advantage: no error axes given")
	}
	for _, r := range ranges {
		if err := r.Validate(); err != nil {
			return nil, fmt.Errorf("geometric advantage: %w", err)
		}
		if r.Axis == OnePhotonAxis {
			return nil, fmt.Errorf("geometric advantage: %s has no counterpart for a directly driven qubit; compare along %s and %s", r.Axis, AmplitudeAxis, TwoPhotonAxis)
		}
	}
	dyn, err := NewDynamical(geo)
	if err != nil {
		return nil, fmt.Errorf("geometric advantage: %w", err)
	}
	thr := opt.threshold()
	if !(thr > 0 && thr < 1) {
		return nil, fmt.Errorf("geometric advantage: threshold %v; need a fidelity between 0 and 1", thr)
	}
	baseGeo := opt.base()
	baseDyn := baseGeo
	baseDyn.ChannelErrors = nil
	gates := [2]*Waveform{geo, dyn.Waveform}
	bases := [2]ErrorModel{baseGeo, baseDyn}

	cmp := &Comparison{Threshold: thr, Dynamical: dyn}
	// All sweep points of both gates as one parallel job list.
	type point struct{ gate, sweep, k int }
	var pts []point
	sw := [2][]*Sweep{}
	for g := range gates {
		for i, r := range ranges {
			x := r.Values()
			sw[g] = append(sw[g], &Sweep{Axis: r.Axis, X: x, Fidelity: make([]float64, len(x)), Leakage: make([]float64, len(x))})
			for k := range x {
				pts = append(pts, point{g, i, k})
			}
		}
	}
	err = runJobs(ctx, len(pts), opt, "geometric advantage: sweeps", func(wk *robustWorker, j int) error {
		p := pts[j]
		s := sw[p.gate][p.sweep]
		m := bases[p.gate]
		s.Axis.set(&m, s.X[p.k])
		out, err := wk.run(gates[p.gate], m)
		if err != nil {
			return err
		}
		s.Fidelity[p.k], s.Leakage[p.k] = out.Fidelity, out.Leakage
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("geometric advantage: %w", err)
	}
	cmp.Geometric, cmp.DynamicalSweeps = sw[0], sw[1]

	// Edge refinement: one job per gate, range and side.
	widths := make([]Width, 2*len(ranges)) // gate g, range i at g*len(ranges)+i
	type edge struct{ gate, sweep, side int }
	var edges []edge
	for g := range gates {
		for i := range ranges {
			for side := 0; side < 2; side++ {
				edges = append(edges, edge{g, i, side})
			}
		}
	}
	res := make([]edgeResult, len(edges))
	err = runJobs(ctx, len(edges), opt, "geometric advantage: edges", func(wk *robustWorker, j int) error {
		e := edges[j]
		r, err := findEdge(ctx, wk, gates[e.gate], bases[e.gate], ranges[e.sweep], sw[e.gate][e.sweep], e.side, thr)
		if err != nil {
			return err
		}
		res[j] = r
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("geometric advantage: %w", err)
	}
	for j, e := range edges {
		w := &widths[e.gate*len(ranges)+e.sweep]
		if e.side == 0 {
			w.Low, w.LowOpen = res[j].x, res[j].open
		} else {
			w.High, w.HighOpen = res[j].x, res[j].open
		}
	}
	// A fidelity below the threshold at zero error leaves no region.
	for j, e := range edges {
		if res[j].zero {
			widths[e.gate*len(ranges)+e.sweep] = Width{}
		}
	}
	for i, r := range ranges {
		gw, dw := widths[i], widths[len(ranges)+i]
		gw.Width, dw.Width = gw.High-gw.Low, dw.High-dw.Low
		row := AdvantageRow{Axis: r.Axis, Geometric: gw, Dynamical: dw}
		switch {
		case dw.Width > 0:
			row.Ratio = gw.Width / dw.Width
		case gw.Width > 0:
			row.Ratio = math.Inf(1)
		default:
			row.Ratio = math.NaN()
		}
		row.Note = advantageNote(gw, dw, dyn)
		cmp.Rows = append(cmp.Rows, row)
	}
	return cmp, nil
}

// advantageNote explains open edges and the pulse-free dynamical gate.
func advantageNote(g, d Width, dyn *Dynamical) string {
	var notes []string
	if dyn.Pulse.Area < 1e-12 {
		notes = append(notes, "the target is diagonal: the dynamical gate is a virtual z rotation without any pulse, unaffected by these errors")
	} else if d.Open() {
		notes = append(notes, "dynamical width is a lower bound (edge beyond the search range)")
	}
	if g.Open() {
		notes = append(notes, "geometric width is a lower bound (edge beyond the search range)")
	}
	if g.Open() || d.Open() {
		notes = append(notes, "the ratio is not a measured value")
	}
	s := ""
	for i, n := range notes {
		if i > 0 {
			s += "; "
		}
		s += n
	}
	return s
}

// edgeResult is one refined edge.
type edgeResult struct {
	x    float64
	open bool
	zero bool // the fidelity at zero error is below the threshold
}

// findEdge locates the edge of the robust region of w on one side
// (0: negative, 1: positive) of zero along r.Axis (method in Compare).
func findEdge(ctx context.Context, wk *robustWorker, w *Waveform, base ErrorModel, r Range, s *Sweep, side int, thr float64) (edgeResult, error) {
	qt := math.Sqrt(1 - thr)
	eval := func(x float64) (float64, error) {
		if err := ctx.Err(); err != nil {
			return 0, err
		}
		m := base
		r.Axis.set(&m, x)
		out, err := wk.run(w, m)
		if err != nil {
			return 0, err
		}
		return math.Sqrt(math.Max(0, 1-out.Fidelity)) - qt, nil
	}
	x, f := s.X, s.Fidelity
	i0 := nearestZero(x)
	if !(f[i0] >= thr) {
		return edgeResult{zero: true}, nil
	}
	dir := 1
	if side == 0 {
		dir = -1
	}
	// Bracket from the sweep.
	j := i0
	for j+dir >= 0 && j+dir < len(x) && f[j+dir] >= thr {
		j += dir
	}
	var a, b, ga, gb float64
	if j+dir >= 0 && j+dir < len(x) {
		a, b = x[j], x[j+dir]
		ga = math.Sqrt(math.Max(0, 1-f[j])) - qt
		gb = math.Sqrt(math.Max(0, 1-f[j+dir])) - qt
	} else {
		// Search outwards from the end of the grid, doubling the distance.
		a = x[j]
		ga = math.Sqrt(math.Max(0, 1-f[j])) - qt
		ext := math.Abs(a)
		if ext == 0 {
			ext = math.Max(math.Abs(r.Min), math.Abs(r.Max))
		}
		if ext == 0 {
			ext = 1e-3 // a one-point range at zero: start small
			if r.Axis != AmplitudeAxis {
				ext = 1e3
			}
		}
		limit := edgeSearchFactor * ext
		if r.Axis == AmplitudeAxis {
			limit = math.Min(limit, maxEdgeAmplitude)
		}
		d := math.Abs(a)
		if d == 0 {
			d = ext / 2
		}
		for {
			if d >= limit {
				return edgeResult{x: a, open: true}, nil
			}
			d = math.Min(2*d, limit)
			xb := float64(dir) * d
			g, err := eval(xb)
			if err != nil {
				return edgeResult{}, err
			}
			if g > 0 {
				b, gb = xb, g
				break
			}
			a, ga = xb, g
		}
	}
	// Illinois iteration on [a (inside), b (outside)].
	side2 := 0
	for it := 0; it < edgeMaxIter; it++ {
		if math.Abs(b-a) <= edgeRelTol*math.Max(math.Abs(a), math.Abs(b)) {
			break
		}
		c := a
		if gb != ga {
			c = a - ga*(b-a)/(gb-ga)
		}
		if !(c > math.Min(a, b) && c < math.Max(a, b)) {
			c = 0.5 * (a + b)
		}
		gc, err := eval(c)
		if err != nil {
			return edgeResult{}, err
		}
		if gc > 0 {
			b, gb = c, gc
			if side2 == -1 {
				ga /= 2
			}
			side2 = -1
		} else {
			a, ga = c, gc
			if side2 == 1 {
				gb /= 2
			}
			side2 = 1
		}
	}
	if gb == ga {
		return edgeResult{x: a}, nil
	}
	c := a - ga*(b-a)/(gb-ga)
	c = math.Max(math.Min(a, b), math.Min(math.Max(a, b), c))
	return edgeResult{x: c}, nil
}
