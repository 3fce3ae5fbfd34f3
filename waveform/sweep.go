package waveform

import (
	"context"
	"errors"
	"fmt"
	"github.com/loopgate/loopgate/holonomy"
	"io"
	"math"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
)

// DefaultThreshold is the fidelity that defines the robust region of a
// gate: widths (Sweep.Width, Compare) measure the region around zero error
// where the average gate fidelity is at least this value.
const DefaultThreshold = 0.999

// Axis is an error axis of a robustness sweep. The value swept along it
// replaces the corresponding field of the base ErrorModel.
type Axis int

const (
	// AmplitudeAxis is the common relative amplitude error ε: every Rabi
	// frequency Ω becomes (1 + ε)Ω (ErrorModel.AmplitudeError).
	// Dimensionless; it must stay above −1.
	AmplitudeAxis Axis = iota + 1
	// OnePhotonAxis is the detuning Δ (Hz) of every excited level
	// (ErrorModel.OnePhotonDetuning). Schemes without an excited level,
	// such as the two-level scheme of the dynamical gate, do not feel it.
	OnePhotonAxis
	// TwoPhotonAxis is the detuning δ (Hz) of the second qubit level from
	// the first (ErrorModel.TwoPhotonDetuning): the error of the qubit
	// frequency. For a Λ or tripod scheme it is the two-photon (Raman)
	// detuning, for a directly driven qubit the detuning of the drive
	// from the qubit transition; both add δ|1⟩⟨1| to H in the rotating
	// frame, so the same value means the same physical error for both.
	TwoPhotonAxis
)

// String names the axis as the report and the command line show it.
func (a Axis) String() string {
	switch a {
	case AmplitudeAxis:
		return "amplitude error ε"
	case OnePhotonAxis:
		return "one-photon detuning Δ"
	case TwoPhotonAxis:
		return "two-photon (qubit) detuning δ"
	}
	return fmt.Sprintf("Axis(%d)", int(a))
}

// Unit returns the unit of the axis values: "" for the dimensionless
// amplitude error and "Hz" for detunings.
func (a Axis) Unit() string {
	if a == AmplitudeAxis {
		return ""
	}
	return "Hz"
}

// set writes v into the field of m that the axis sweeps.
func (a Axis) set(m *ErrorModel, v float64) {
	switch a {
	case AmplitudeAxis:
		m.AmplitudeError = v
	case OnePhotonAxis:
		m.OnePhotonDetuning = v
	case TwoPhotonAxis:
		m.TwoPhotonDetuning = v
	default:
		panic(fmt.Sprintf("waveform: unknown error axis %d", int(a)))
	}
}

// validValue reports whether v is an allowed value on the axis.
func (a Axis) validValue(v float64) bool {
	if !holonomy.Finite(v) {
		return false
	}
	return a != AmplitudeAxis || v > -1
}

// Range is an evenly spaced grid of error values along one axis.
type Range struct {
	// Axis is the error axis.
	Axis Axis
	// Min and Max are the first and last values (ε dimensionless,
	// detunings in Hz); Min ≤ Max. For widths the range should contain
	// zero; with Min = −Max and an odd number of points zero is a grid
	// point exactly.
	Min, Max float64
	// Points is the number of values, at least 2 (or 1 when Min = Max).
	Points int
}

// MaxPoints is the largest number of points of a Range.
const MaxPoints = 4096

// Validate reports whether the range is well formed.
func (r Range) Validate() error {
	switch r.Axis {
	case AmplitudeAxis, OnePhotonAxis, TwoPhotonAxis:
	default:
		return fmt.Errorf("unknown error axis %d", int(r.Axis))
	}
	if !r.Axis.validValue(r.Min) || !r.Axis.validValue(r.Max) {
		if r.Axis == AmplitudeAxis {
			return fmt.Errorf("%s: range %v to %v; need finite values above −1", r.Axis, r.Min, r.Max)
		}
		return fmt.Errorf("%s: range %v to %v Hz; need finite values", r.Axis, r.Min, r.Max)
	}
	if r.Min > r.Max {
		return fmt.Errorf("%s: range minimum %v exceeds maximum %v", r.Axis, r.Min, r.Max)
	}
	if r.Points < 1 || r.Points > MaxPoints || (r.Points == 1 && r.Min != r.Max) {
		return fmt.Errorf("%s: %d grid points; need 2 to %d (1 only when minimum = maximum)", r.Axis, r.Points, MaxPoints)
	}
	return nil
}

// Values returns the grid x_i = Min·(1 − t_i) + Max·t_i, t_i = i/(Points−1).
// This form reproduces Min and Max exactly and gives exactly zero in the
// middle of a symmetric range with an odd number of points.
func (r Range) Values() []float64 {
	if r.Points <= 1 {
		return []float64{r.Min}
	}
	x := make([]float64, r.Points)
	for i := range x {
		t := float64(i) / float64(r.Points-1)
		x[i] = r.Min*(1-t) + r.Max*t
	}
	x[len(x)-1] = r.Max
	return x
}

// SweepOptions controls how sweeps, maps, budgets and comparisons run. The
// zero value (or a nil pointer) runs on all cores, quietly, around the ideal
// quantised model.
type SweepOptions struct {
	// Base is the error model the swept axes modify: each grid point uses
	// Base with the swept fields replaced by the grid values. The zero
	// value is the ideal model of the quantised waveform.
	Base ErrorModel
	// Workers is the number of goroutines, each with its own simulation
	// workspace; 0 means runtime.GOMAXPROCS(0). Results do not depend on
	// it: every simulation writes into its own slot.
	Workers int
	// Progress, if not nil, receives a one-line progress bar redrawn
	// with a carriage return and ended with a newline. The caller decides
	// whether the destination is a terminal.
	Progress io.Writer
	// OnProgress, if not nil, is called after each simulation with the
	// number done and the total. Calls come from the worker goroutines,
	// one at a time, with done increasing.
	OnProgress func(done, total int)
	// Threshold is the fidelity defining the robust region in Compare;
	// 0 means DefaultThreshold.
	Threshold float64
}

func (o *SweepOptions) workers() int {
	if o != nil && o.Workers > 0 {
		return o.Workers
	}
	return runtime.GOMAXPROCS(0)
}

func (o *SweepOptions) threshold() float64 {
	if o != nil && o.Threshold > 0 {
		return o.Threshold
	}
	return DefaultThreshold
}

func (o *SweepOptions) base() ErrorModel {
	if o == nil {
		return ErrorModel{}
	}
	return o.Base
}

// Sweep is a one-dimensional robustness curve: the gate's fidelity as one
// error is varied, the others held at the base model.
type Sweep struct {
	// Axis is the swept error.
	Axis Axis
	// X holds the error values, increasing (ε dimensionless, detunings Hz).
	X []float64
	// Fidelity and Leakage hold the average gate fidelity and the leakage
	// (see Outcome) at each X.
	Fidelity, Leakage []float64
}

// ErrorMap is a two-dimensional robustness map.
type ErrorMap struct {
	// XAxis and YAxis are the errors along the columns and the rows.
	XAxis, YAxis Axis
	// X and Y hold the error values, increasing.
	X, Y []float64
	// Fidelity[i][j] is the average gate fidelity at X[j], Y[i].
	Fidelity [][]float64
}

// SweepAxis simulates w at every value of r (all other errors as in the
// options' base model) in parallel and returns the fidelity curve. It
// honours ctx: on cancellation it stops within one simulation per worker
// and returns an error wrapping ctx.Err().
func SweepAxis(ctx context.Context, w *Waveform, r Range, opt *SweepOptions) (*Sweep, error) {
	if err := r.Validate(); err != nil {
		return nil, fmt.Errorf("robustness sweep: %w", err)
	}
	x := r.Values()
	s := &Sweep{Axis: r.Axis, X: x, Fidelity: make([]float64, len(x)), Leakage: make([]float64, len(x))}
	base := opt.base()
	err := runJobs(ctx, len(x), opt, "sweep "+r.Axis.String(), func(wk *robustWorker, k int) error {
		m := base
		r.Axis.set(&m, x[k])
		out, err := wk.run(w, m)
		if err != nil {
			return err
		}
		s.Fidelity[k], s.Leakage[k] = out.Fidelity, out.Leakage
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("robustness sweep along %s: %w", r.Axis, err)
	}
	return s, nil
}

// SweepMap simulates w on the grid x × y (the two axes must differ) in
// parallel and returns the map. Cancellation works as in SweepAxis.
func SweepMap(ctx context.Context, w *Waveform, x, y Range, opt *SweepOptions) (*ErrorMap, error) {
	if err := x.Validate(); err != nil {
		return nil, fmt.Errorf("robustness map: horizontal axis: %w", err)
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("robustness map: vertical axis: %w", err)
	}
	if x.Axis == y.Axis {
		return nil, fmt.Errorf("robustness map: both axes are %s", x.Axis)
	}
	em := &ErrorMap{XAxis: x.Axis, YAxis: y.Axis, X: x.Values(), Y: y.Values()}
	nx, ny := len(em.X), len(em.Y)
	flat := make([]float64, nx*ny)
	em.Fidelity = make([][]float64, ny)
	for i := range em.Fidelity {
		em.Fidelity[i] = flat[i*nx : (i+1)*nx : (i+1)*nx]
	}
	base := opt.base()
	err := runJobs(ctx, nx*ny, opt, "robustness map", func(wk *robustWorker, k int) error {
		m := base
		x.Axis.set(&m, em.X[k%nx])
		y.Axis.set(&m, em.Y[k/nx])
		out, err := wk.run(w, m)
		if err != nil {
			return err
		}
		flat[k] = out.Fidelity
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("robustness map %s × %s: %w", x.Axis, y.Axis, err)
	}
	return em, nil
}

// Width is the extent of the robust region along one error axis: the
// connected interval around zero error where the fidelity is at least the
// threshold.
type Width struct {
	// Low ≤ 0 ≤ High are the edges of the region; both are zero when the
	// fidelity at zero error is below the threshold.
	Low, High float64
	// Width is High − Low.
	Width float64
	// LowOpen and HighOpen report that the fidelity stayed at or above the
	// threshold up to the end of the range examined on that side: the
	// true edge lies beyond, and Low or High is that end (so Width is a
	// lower bound).
	LowOpen, HighOpen bool
}

// Open reports whether either edge lies beyond the range examined.
func (w Width) Open() bool { return w.LowOpen || w.HighOpen }

// Width returns the robust region of the sweep for the given threshold
// (0 means DefaultThreshold), from the sweep's points alone.
//
// Method: the region is the longest run of consecutive grid points with
// F ≥ threshold that contains the grid point nearest to zero error (the
// width is zero if that point is below the threshold). Each edge lies
// between the last point inside and the first point outside; it is placed
// by linear interpolation of q(x) = √(1 − F(x)) to q = √(1 − threshold).
// Near a quadratic fidelity maximum, 1 − F ≈ c·(x − x₀)², q is linear in x
// and the interpolation is exact; elsewhere it is second-order accurate in
// the grid step. Compare refines edges with further simulations instead.
func (s *Sweep) Width(threshold float64) Width {
	if threshold <= 0 {
		threshold = DefaultThreshold
	}
	return widthFromPoints(s.X, s.Fidelity, threshold)
}

// widthFromPoints implements Sweep.Width.
func widthFromPoints(x, f []float64, thr float64) Width {
	if len(x) == 0 {
		return Width{}
	}
	i0 := nearestZero(x)
	if !(f[i0] >= thr) {
		return Width{}
	}
	qt := math.Sqrt(1 - thr)
	var w Width
	// Upward.
	j := i0
	for j+1 < len(x) && f[j+1] >= thr {
		j++
	}
	if j+1 == len(x) {
		w.High, w.HighOpen = x[j], true
	} else {
		w.High = crossing(x[j], x[j+1], f[j], f[j+1], qt)
	}
	j = i0
	for j > 0 && f[j-1] >= thr {
		j--
	}
	if j == 0 {
		w.Low, w.LowOpen = x[0], true
	} else {
		w.Low = crossing(x[j], x[j-1], f[j], f[j-1], qt)
	}
	w.Low, w.High = math.Min(w.Low, 0), math.Max(w.High, 0)
	w.Width = w.High - w.Low
	return w
}

// nearestZero returns the index of the value nearest to zero (the first
// one on a tie).
func nearestZero(x []float64) int {
	best := 0
	for i, v := range x {
		if math.Abs(v) < math.Abs(x[best]) {
			best = i
		}
	}
	return best
}

// crossing interpolates linearly in q = √(1 − F) between a good point
// (xa, fa ≥ threshold) and a bad one (xb, fb < threshold).
func crossing(xa, xb, fa, fb, qt float64) float64 {
	qa := math.Sqrt(math.Max(0, 1-fa))
	qb := math.Sqrt(math.Max(0, 1-fb))
	if !(qb > qa) {
		return xa
	}
	t := (qt - qa) / (qb - qa)
	t = math.Max(0, math.Min(1, t))
	return xa + t*(xb-xa)
}

// robustWorker is one goroutine's simulation workspace: a Simulator per
// waveform (created on first use, then reused without allocation) and an
// Outcome.
type robustWorker struct {
	sims map[*Waveform]*Simulator
	out  Outcome
}

// run simulates w under m with the worker's workspace. The returned
// Outcome is overwritten by the next run.
func (wk *robustWorker) run(w *Waveform, m ErrorModel) (*Outcome, error) {
	sim := wk.sims[w]
	if sim == nil {
		sim = NewSimulator(w)
		if wk.sims == nil {
			wk.sims = make(map[*Waveform]*Simulator)
		}
		wk.sims[w] = sim
	}
	if err := sim.Run(m, &wk.out); err != nil {
		return nil, err
	}
	return &wk.out, nil
}

// errStop marks a job that stopped because another failed.
var errStop = errors.New("stopped")

// runJobs runs job(k) for k = 0 … n−1 on opt.workers() goroutines, each
// with its own robustWorker, handing out indices in order. It reports
// progress, stops early on cancellation or on the first failure, and
// returns the error of the lowest failing index among the jobs that ran,
// or the context's error.
func runJobs(ctx context.Context, n int, opt *SweepOptions, label string, job func(wk *robustWorker, k int) error) error {
	if n == 0 {
		return nil
	}
	nw := min(opt.workers(), n)
	var (
		next    atomic.Int64
		failed  atomic.Bool
		mu      sync.Mutex
		errIdx  = n
		firstEr error
		wg      sync.WaitGroup
	)
	bar := newProgressBar(opt, label, n)
	for g := 0; g < nw; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			wk := new(robustWorker)
			for {
				if failed.Load() || ctx.Err() != nil {
					return
				}
				k := int(next.Add(1) - 1)
				if k >= n {
					return
				}
				if err := job(wk, k); err != nil {
					mu.Lock()
					if k < errIdx {
						errIdx, firstEr = k, err
					}
					mu.Unlock()
					failed.Store(true)
					return
				}
				bar.add()
			}
		}()
	}
	wg.Wait()
	bar.finish()
	if firstEr != nil {
		return firstEr
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("cancelled after %d of %d simulations: %w", bar.count(), n, err)
	}
	return nil
}

// progressBar reports progress to SweepOptions.Progress and OnProgress.
type progressBar struct {
	mu     sync.Mutex
	w      io.Writer
	cb     func(done, total int)
	label  string
	total  int
	done   int
	drawn  int // last permille drawn, −1 before the first
	active bool
}

const barCells = 30

func newProgressBar(opt *SweepOptions, label string, total int) *progressBar {
	b := &progressBar{label: label, total: total, drawn: -1}
	if opt != nil {
		b.w, b.cb = opt.Progress, opt.OnProgress
	}
	if b.w != nil {
		b.draw()
	}
	return b
}

// add records one finished simulation.
func (b *progressBar) add() {
	if b.w == nil && b.cb == nil {
		b.mu.Lock()
		b.done++
		b.mu.Unlock()
		return
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	b.done++
	if b.cb != nil {
		b.cb(b.done, b.total)
	}
	if b.w != nil {
		b.draw()
	}
}

func (b *progressBar) count() int {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.done
}

// draw redraws the bar when the shown permille changed; b.mu is held (or
// the bar is not yet shared).
func (b *progressBar) draw() {
	pm := b.done * 1000 / b.total
	if pm == b.drawn {
		return
	}
	b.drawn = pm
	full := b.done * barCells / b.total
	// Write errors are ignored: the bar is a courtesy, not output.
	fmt.Fprintf(b.w, "\r%s [%s%s] %5.1f%% %d/%d", b.label,
		strings.Repeat("#", full), strings.Repeat(".", barCells-full),
		float64(pm)/10, b.done, b.total)
	b.active = true
}

// finish ends the bar's line.
func (b *progressBar) finish() {
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.w != nil && b.active {
		fmt.Fprintln(b.w)
		b.active = false
	}
}
