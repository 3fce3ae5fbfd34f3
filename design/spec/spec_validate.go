package spec

import (
	"fmt"
	"math"
	"math/cmplx"
	"regexp"

	"github.com/loopgate/loopgate/holonomy"
)

var nameRE = regexp.MustCompile(namePattern)

// CheckSampleMemory reports an error when a waveform of samples samples on
// each of channels channels exceeds MaxSampleCount or would need more than
// MaxWaveformBytes (at BytesPerSample per sample and channel). Call it
// before allocating sample buffers.
func CheckSampleMemory(samples, channels int) error {
	if samples < 0 || channels < 0 {
		return fmt.Errorf("negative waveform size: %d samples on %d channels", samples, channels)
	}
	if samples > MaxSampleCount {
		return fmt.Errorf("%d samples per channel is more than the bound %d", samples, MaxSampleCount)
	}
	need := float64(samples) * float64(channels) * BytesPerSample
	if need > MaxWaveformBytes {
		return fmt.Errorf("%d samples × %d channels would need about %s of memory, more than the bound %s",
			samples, channels, formatBytes(need), formatBytes(MaxWaveformBytes))
	}
	return nil
}

func formatBytes(b float64) string {
	switch {
	case b >= 1<<30:
		return fmt.Sprintf("%.3g GiB", b/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%.3g MiB", b/(1<<20))
	}
	return fmt.Sprintf("%.0f bytes", b)
}

// checker collects problems of a resolved Spec.
type checker struct{ probs []Problem }

func (c *checker) bad(path, format string, args ...any) {
	c.probs = append(c.probs, Problem{Path: path, Msg: fmt.Sprintf(format, args...)})
}

// positive checks x > 0 and finite.
func (c *checker) positive(path string, x float64, dim Dimension) bool {
	if !holonomy.Finite(x) || x <= 0 {
		c.bad(path, "must be positive; found %s", showValue(x, dim))
		return false
	}
	return true
}

func (c *checker) intRange(path string, x, lo, hi int, what string) {
	if x < lo || x > hi {
		c.bad(path, "%s must be from %d to %d; found %d", what, lo, hi, x)
	}
}

func showValue(x float64, dim Dimension) string {
	if !holonomy.Finite(x) {
		return fmt.Sprint(x)
	}
	switch dim {
	case 0:
		return fmt.Sprintf("%g", x)
	case Rate:
		return fmt.Sprintf("Γ = %s (Γ/2π = %s)", FormatQuantity(x, Rate), FormatQuantity(x/(2*math.Pi), Frequency))
	}
	return FormatQuantity(x, dim)
}

// check returns the problems of s; it never panics on a partly filled Spec.
func (s *Spec) check() []Problem {
	c := &checker{}
	s.checkTarget(c)
	schemeOK := s.checkScheme(c)
	if s.Method != Adiabatic && s.Method != Nonadiabatic {
		c.bad("method", "expected adiabatic or nonadiabatic")
	}
	nch := 0
	if s.Scheme != nil {
		nch = len(s.Scheme.Channels)
	}
	s.checkHardware(c, nch)
	if schemeOK && (s.Method == Adiabatic || s.Method == Nonadiabatic) {
		s.checkWorkingSubspace(c)
	}
	s.checkSearch(c)
	s.checkErrors(c, nch)
	s.checkSweeps(c)
	return c.probs
}

func (s *Spec) checkTarget(c *checker) {
	u := s.Target.U
	if u == nil {
		c.bad("target", "missing; give a gate, a rotation or a unitary")
		return
	}
	if u.R != 2 || u.C != 2 || len(u.Data) != 4 {
		c.bad("target", "the target must be a 2×2 matrix; found %d×%d", u.R, u.C)
		return
	}
	for _, z := range u.Data {
		if cmplx.IsNaN(z) || cmplx.IsInf(z) {
			c.bad("target.unitary", "an entry is not finite")
			return
		}
	}
	if e := holonomy.UnitarityError(u); !(e <= UnitarityTol) {
		c.bad("target.unitary", "not unitary: ‖U†U − I‖ = %.3g (Frobenius norm) exceeds the tolerance %g; write the entries with at least 10 significant digits", e, UnitarityTol)
	}
}

func (s *Spec) levelPath(k int, field string) string {
	if s.Preset != "" {
		return fmt.Sprintf("scheme.%s.%s", field, s.Scheme.Levels[k].Name)
	}
	return fmt.Sprintf("scheme.levels[%d].%s", k, field)
}

// checkScheme checks the scheme's structure and reports whether it is
// sound enough for the working-subspace check.
func (s *Spec) checkScheme(c *checker) bool {
	sc := s.Scheme
	if sc == nil {
		c.bad("scheme", "missing; give a preset or levels and channels")
		return false
	}
	n0 := len(c.probs)
	n := len(sc.Levels)
	if n < 2 || n > holonomy.MaxLevels {
		c.bad("scheme.levels", "%d levels; a scheme has 2 to %d", n, holonomy.MaxLevels)
		return false
	}
	seen := map[string]int{}
	for k, l := range sc.Levels {
		if !nameRE.MatchString(l.Name) {
			c.bad(fmt.Sprintf("scheme.levels[%d].name", k), "%q is not a valid level name; use 1 to 24 letters, digits or the characters _ + = / -", l.Name)
		} else if j, dup := seen[l.Name]; dup {
			c.bad(fmt.Sprintf("scheme.levels[%d].name", k), "level name %q is used twice (also scheme.levels[%d])", l.Name, j)
		}
		seen[l.Name] = k
		if !holonomy.Finite(l.Detuning) {
			c.bad(s.levelPath(k, "detuning"), "must be finite; found %v", l.Detuning)
		}
		if !holonomy.Finite(l.Decay) || l.Decay < 0 {
			c.bad(s.levelPath(k, "decay"), "a decay rate must be zero or positive; found %s", showValue(l.Decay, Rate))
		}
	}
	if len(sc.Channels) == 0 || len(sc.Channels) > MaxChannels {
		c.bad("scheme.channels", "%d channels; a scheme has 1 to %d", len(sc.Channels), MaxChannels)
		return false
	}
	seenC := map[string]int{}
	pairs := map[[2]int]int{}
	for i, ch := range sc.Channels {
		p := fmt.Sprintf("scheme.channels[%d]", i)
		if !nameRE.MatchString(ch.Name) {
			c.bad(p+".name", "%q is not a valid channel name; use 1 to 24 letters, digits or the characters _ + = / -", ch.Name)
		} else if j, dup := seenC[ch.Name]; dup {
			c.bad(p+".name", "channel name %q is used twice (also scheme.channels[%d])", ch.Name, j)
		}
		seenC[ch.Name] = i
		okL := ch.Lower >= 0 && ch.Lower < n
		okU := ch.Upper >= 0 && ch.Upper < n
		if !okL {
			c.bad(p+".lower", "channel %q names a level that does not exist", ch.Name)
		}
		if !okU {
			c.bad(p+".upper", "channel %q names a level that does not exist", ch.Name)
		}
		if okL && okU {
			if ch.Lower == ch.Upper {
				c.bad(p+".upper", "channel %q couples level %q to itself; a channel joins two different levels", ch.Name, sc.Levels[ch.Lower].Name)
			} else {
				key := [2]int{min(ch.Lower, ch.Upper), max(ch.Lower, ch.Upper)}
				if j, dup := pairs[key]; dup {
					c.bad(p, "channels %q and %q both join levels %q and %q; give one channel per transition", sc.Channels[j].Name, ch.Name, sc.Levels[key[0]].Name, sc.Levels[key[1]].Name)
				}
				pairs[key] = i
			}
		}
		if !holonomy.Finite(ch.Factor) || ch.Factor == 0 {
			c.bad(p+".factor", "the matrix-element factor must be finite and non-zero; found %v", ch.Factor)
		}
	}
	q := sc.Computational
	switch {
	case len(q) != 2:
		c.bad("scheme.qubit", "a qubit has 2 levels; found %d", len(q))
	case q[0] < 0 || q[0] >= n || q[1] < 0 || q[1] >= n:
		c.bad("scheme.qubit", "qubit levels are not in the scheme")
	case q[0] == q[1]:
		c.bad("scheme.qubit", "level %q is given twice; the qubit needs two different levels", sc.Levels[q[0]].Name)
	default:
		for _, k := range q {
			coupled := false
			for _, ch := range sc.Channels {
				if ch.Lower == k || ch.Upper == k {
					coupled = true
				}
			}
			if !coupled {
				c.bad("scheme.qubit", "qubit level %q is not coupled by any channel; no loop can act on it", sc.Levels[k].Name)
			}
		}
	}
	if len(c.probs) == n0 {
		// The engine's own structural check; the checks above are meant to
		// cover it with better messages, so this is a safety net.
		if err := sc.Validate(); err != nil {
			c.bad("scheme", "%v", err)
		}
	}
	return len(c.probs) == n0
}

// checkWorkingSubspace checks that the scheme offers the method a working
// subspace. Adiabatic: with every channel driven on resonance at the same
// Rabi frequency, the eigenspace of H at the qubit levels' energy (the
// dark subspace) must be exactly two-dimensional, so that the holonomy is a
// U(2) acting on the qubit (Duan, Cirac and Zoller, Science 292, 1695
// (2001), for the tripod). Spin presets are exempt: their working states
// are the non-degenerate spin states along the field, which carry Abelian
// geometric phases (diagonal gates only; the search decides
// reachability). Nonadiabatic: some level must be coupled to both qubit
// levels, forming the Λ of Sjöqvist et al., New J. Phys. 14, 103035 (2012).
func (s *Spec) checkWorkingSubspace(c *checker) {
	sc := s.Scheme
	q0, q1 := sc.Computational[0], sc.Computational[1]
	if s.Method == Nonadiabatic {
		for k := range sc.Levels {
			if k == q0 || k == q1 {
				continue
			}
			if joined(sc, q0, k) && joined(sc, q1, k) {
				return
			}
		}
		c.bad("scheme", "no working subspace for the nonadiabatic method: it needs a level coupled by a channel to both qubit levels (%s and %s), as the excited level of a Λ scheme; this scheme has none",
			sc.Levels[q0].Name, sc.Levels[q1].Name)
		return
	}
	if IsSpinPreset(s.Preset) {
		return
	}
	rabi := math.Inf(1)
	for _, r := range s.Hardware.MaxRabi {
		if r > 0 && holonomy.Finite(r) {
			rabi = math.Min(rabi, r)
		}
	}
	if math.IsInf(rabi, 1) {
		rabi = 1e6
	}
	dim, weight, e0, err := darkSubspace(sc, 2*math.Pi*rabi)
	if err != nil {
		c.bad("scheme", "%v", err)
		return
	}
	where := fmt.Sprintf("with every channel driven on resonance at %s, the scheme has", FormatQuantity(rabi, Frequency))
	switch {
	case dim < 2:
		msg := fmt.Sprintf("no degenerate working subspace for the adiabatic method: %s %d dark state(s) at the qubit levels' energy (%s); an adiabatic qubit gate needs a two-fold degenerate dark subspace, as in a tripod",
			where, dim, FormatQuantity(e0/(2*math.Pi), Frequency))
		if s.Preset == "lambda" {
			msg += "; a Λ scheme has one dark state: use method: nonadiabatic"
		}
		c.bad("scheme", "%s", msg)
	case dim > 2:
		c.bad("scheme", "no two-level working subspace for the adiabatic method: %s a %d-fold dark subspace, larger than the qubit; a loop would move population into the extra dark states", where, dim)
	case weight < 1e-6:
		c.bad("scheme", "no working subspace for the adiabatic method: %s a two-fold dark subspace with no weight on the qubit levels", where)
	}
}

// joined reports whether a channel joins levels a and b.
func joined(sc *holonomy.Scheme, a, b int) bool {
	for _, ch := range sc.Channels {
		if (ch.Lower == a && ch.Upper == b) || (ch.Lower == b && ch.Upper == a) {
			return true
		}
	}
	return false
}

// darkSubspace drives every channel of sc at Rabi frequency omega (rad/s,
// phase 0) and returns the dimension of the eigenspace of H at the energy
// e0 of the first qubit level, the weight Tr(P_dark P_qubit) of that
// eigenspace on the qubit levels, and e0. The qubit levels must have the
// same static detuning.
func darkSubspace(sc *holonomy.Scheme, omega float64) (dim int, weight, e0 float64, err error) {
	n := len(sc.Levels)
	q0, q1 := sc.Computational[0], sc.Computational[1]
	e0 = sc.Levels[q0].Detuning
	scale := omega
	for _, l := range sc.Levels {
		scale = math.Max(scale, math.Abs(l.Detuning))
	}
	tol := 1e-9 * scale
	if d := sc.Levels[q1].Detuning - e0; math.Abs(d) > tol {
		return 0, 0, e0, fmt.Errorf("no degenerate working subspace: the qubit levels %q and %q have different static detunings (%s apart), so their dark states are not degenerate",
			sc.Levels[q0].Name, sc.Levels[q1].Name, FormatQuantity(math.Abs(d)/(2*math.Pi), Frequency))
	}
	p := sc.NewPoint()
	for i := range p.Drive {
		p.Drive[i] = complex(omega, 0)
	}
	h := holonomy.NewMat(n, n)
	sc.Hamiltonian(h, p)
	vals := make([]float64, n)
	vecs := holonomy.NewMat(n, n)
	holonomy.NewEigen(n).Factorize(h, vals, vecs)
	for j, v := range vals {
		if math.Abs(v-e0) > tol {
			continue
		}
		dim++
		for _, k := range sc.Computational {
			a := vecs.At(k, j)
			weight += real(a)*real(a) + imag(a)*imag(a)
		}
	}
	return dim, weight, e0, nil
}

func (s *Spec) chanPath(field string, i int) string {
	if s.Scheme != nil && i < len(s.Scheme.Channels) {
		return fmt.Sprintf("%s.%s", field, s.Scheme.Channels[i].Name)
	}
	return fmt.Sprintf("%s[%d]", field, i)
}

func (s *Spec) checkHardware(c *checker, nch int) {
	h := &s.Hardware
	for _, f := range []struct {
		name string
		v    []float64
	}{{"hardware.max_rabi", h.MaxRabi}, {"hardware.max_slew", h.MaxSlew}, {"hardware.full_scale", h.FullScale}} {
		if len(f.v) != nch {
			c.bad(f.name, "has %d values for %d channels", len(f.v), nch)
			return
		}
	}
	for i := 0; i < nch; i++ {
		okR := c.positive(s.chanPath("hardware.max_rabi", i), h.MaxRabi[i], Frequency)
		c.positive(s.chanPath("hardware.max_slew", i), h.MaxSlew[i], SlewRate)
		okF := c.positive(s.chanPath("hardware.full_scale", i), h.FullScale[i], Frequency)
		if okR && okF && h.FullScale[i] < h.MaxRabi[i] {
			c.bad(s.chanPath("hardware.full_scale", i), "the DAC full scale %s is below max_rabi %s: the DAC cannot reach the allowed Rabi frequency",
				FormatQuantity(h.FullScale[i], Frequency), FormatQuantity(h.MaxRabi[i], Frequency))
		}
	}
	okRate := c.positive("hardware.sample_rate", h.SampleRate, SampleRate)
	c.intRange("hardware.granularity", h.Granularity, 1, MaxGranularity, "the granularity")
	okN := h.MaxSamples >= 1 && h.MaxSamples <= MaxSampleCount
	c.intRange("hardware.max_samples", h.MaxSamples, 1, MaxSampleCount, "the sample count")
	if okN && h.Granularity > h.MaxSamples {
		c.bad("hardware.granularity", "%d is more than max_samples %d", h.Granularity, h.MaxSamples)
	}
	if okN {
		if err := CheckSampleMemory(h.MaxSamples, nch); err != nil {
			c.bad("hardware.max_samples", "%v", err)
		}
	}
	c.intRange("hardware.dac_bits", h.DACBits, MinDACBits, MaxDACBits, "the DAC resolution in bits")
	okMin := c.positive("hardware.min_duration", h.MinDuration, Time)
	okMax := c.positive("hardware.max_duration", h.MaxDuration, Time)
	if okMin && okMax && h.MinDuration > h.MaxDuration {
		c.bad("hardware.min_duration", "%s is longer than max_duration %s", FormatQuantity(h.MinDuration, Time), FormatQuantity(h.MaxDuration, Time))
	}
	if okMin && okRate && okN {
		if need := math.Ceil(h.MinDuration*h.SampleRate - 1e-9); need > float64(h.MaxSamples) {
			c.bad("hardware.min_duration", "a gate of at least %s at %s needs %.0f samples, more than max_samples %d",
				FormatQuantity(h.MinDuration, Time), FormatQuantity(h.SampleRate, SampleRate), need, h.MaxSamples)
		}
	}
	if okMax && okRate && h.MaxDuration*h.SampleRate < 1 {
		c.bad("hardware.max_duration", "%s is shorter than one sample at %s", FormatQuantity(h.MaxDuration, Time), FormatQuantity(h.SampleRate, SampleRate))
	}
}

func (s *Spec) checkSearch(c *checker) {
	r := &s.Search
	switch r.Family {
	case Fourier:
		c.intRange("search.harmonics", r.Harmonics, 1, MaxHarmonics, "the number of harmonics")
	case Polygon:
		c.intRange("search.vertices", r.Vertices, MinVertices, MaxVertices, "the number of vertices")
	default:
		c.bad("search.family", "expected fourier or polygon")
	}
	c.intRange("search.restarts", r.Restarts, 1, MaxRestarts, "the number of restarts")
	c.intRange("search.evaluations", r.Evaluations, 1, MaxEvaluations, "the evaluation budget")
	if r.Restarts >= 1 && r.Evaluations >= 1 && r.Restarts <= MaxRestarts && r.Evaluations <= MaxEvaluations &&
		r.Restarts*r.Evaluations > MaxTotalEvaluations {
		c.bad("search.evaluations", "restarts × evaluations = %d × %d = %d is more than the bound %d", r.Restarts, r.Evaluations, r.Restarts*r.Evaluations, MaxTotalEvaluations)
	}
	c.intRange("search.loop_points", r.LoopPoints, MinLoopPoints, MaxLoopPoints, "the number of loop points")
	if r.Seed > MaxSeed {
		c.bad("search.seed", "a seed is a whole number from 0 to %d; found %d", uint64(MaxSeed), r.Seed)
	}
	if !holonomy.Finite(r.TargetInfidelity) || r.TargetInfidelity <= 0 || r.TargetInfidelity >= 1 {
		c.bad("search.target_infidelity", "must be above 0 and below 1; found %v", r.TargetInfidelity)
	}
	e := r.Robust
	if !holonomy.Finite(e.Amplitude) || e.Amplitude < 0 || e.Amplitude >= 1 {
		c.bad("search.robust.amplitude", "must be from 0 to below 1; found %v", e.Amplitude)
	}
	if !holonomy.Finite(e.Detuning) || e.Detuning < 0 {
		c.bad("search.robust.detuning", "must be zero or positive; found %s", showValue(e.Detuning, Frequency))
	}
	if e.Detuning != 0 {
		s.checkKind(c, "search.robust.detuning_kind", e.DetuningKind)
	}
}

func (s *Spec) checkKind(c *checker, path string, k DetuningKind) {
	switch k {
	case OnePhoton:
		if s.Scheme != nil && len(s.Excited) == 0 {
			c.bad(path, "one-photon detuning needs an excited level (a non-qubit level that is the upper level of a channel); the %s scheme has none: use two-photon", s.Scheme.Name)
		}
	case TwoPhoton:
	default:
		c.bad(path, "expected one-photon or two-photon")
	}
}

func (s *Spec) checkErrors(c *checker, nch int) {
	e := &s.Errors
	if len(e.Amplitude) != nch {
		c.bad("errors.amplitude", "has %d values for %d channels", len(e.Amplitude), nch)
	} else {
		for i, a := range e.Amplitude {
			if !holonomy.Finite(a) || a <= -1 || a >= 1 {
				c.bad(s.chanPath("errors.amplitude", i), "an amplitude error must be above −1 and below 1; found %v", a)
			}
		}
	}
	if !holonomy.Finite(e.OnePhoton) {
		c.bad("errors.one_photon_detuning", "must be finite")
	} else if e.OnePhoton != 0 {
		s.checkKind(c, "errors.one_photon_detuning", OnePhoton)
	}
	if !holonomy.Finite(e.TwoPhoton) {
		c.bad("errors.two_photon_detuning", "must be finite")
	}
	if !holonomy.Finite(e.Dephasing) || e.Dephasing < 0 {
		c.bad("errors.dephasing", "a dephasing rate must be zero or positive; found %s", showValue(e.Dephasing, Rate))
	}
	switch e.Filter {
	case NoFilter:
		if e.RiseTime != 0 {
			c.bad("errors.rise_time", "a rise time is given but no filter; set filter: gaussian or first-order")
		}
	case GaussianFilter, FirstOrderFilter:
		if !holonomy.Finite(e.RiseTime) || e.RiseTime <= 0 {
			c.bad("errors.rise_time", "the %s filter needs a positive rise time; found %s", e.Filter, showValue(e.RiseTime, Time))
		}
	default:
		c.bad("errors.filter", "expected none, gaussian or first-order")
	}
	if !holonomy.Finite(e.PhaseStep) || e.PhaseStep < 0 || e.PhaseStep > math.Pi {
		c.bad("errors.phase_step", "must be from 0 to 180 deg; found %s", showValue(e.PhaseStep, Angle))
	}
}

func (s *Spec) checkSweeps(c *checker) {
	w := &s.Sweeps
	if a := w.Amplitude.Span; !holonomy.Finite(a) || a <= 0 || a >= 1 {
		c.bad("sweeps.amplitude.span", "must be above 0 and below 1; found %v", a)
	}
	c.intRange("sweeps.amplitude.points", w.Amplitude.Points, 2, MaxSweepPoints, "the number of sweep points")
	c.positive("sweeps.detuning.span", w.Detuning.Span, Frequency)
	c.intRange("sweeps.detuning.points", w.Detuning.Points, 2, MaxSweepPoints, "the number of sweep points")
	s.checkKind(c, "sweeps.detuning.kind", w.DetuningKind)
	c.intRange("sweeps.map.amplitude_points", w.MapAmplitude, 2, MaxMapPoints, "the number of map points")
	c.intRange("sweeps.map.detuning_points", w.MapDetuning, 2, MaxMapPoints, "the number of map points")
}
