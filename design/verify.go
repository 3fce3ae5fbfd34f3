package design

import (
	"context"
	"fmt"
	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/waveform/wavefile"
	"io"
	"math"
	"os"
	"path/filepath"

	"github.com/loopgate/loopgate/waveform"
)

// ErrorFlags holds error-model overrides as the user typed them on the
// command line; an empty string keeps the file's value. They are parsed
// with ParseQuantity.
type ErrorFlags struct {
	Amplitude string // common amplitude error ε (number or percent)
	OnePhoton string // excited-level detuning Δ/2π
	TwoPhoton string // two-photon detuning δ/2π
	Decay     string // decay of the excited levels (Γ/2π in Hz or Γ in /s)
	Dephasing string // qubit dephasing (γφ/2π in Hz or γφ in /s)
	RiseTime  string // 10–90 % rise time of the analog output
	Filter    string // low-pass shape: none, gaussian or first-order
	PhaseStep string // drive-phase resolution (an angle)
}

// apply parses the flags into m.
func (f ErrorFlags) apply(m *waveform.ErrorModel) error {
	set := func(flag, text string, dim spec.Dimension, dst *float64) error {
		if text == "" {
			return nil
		}
		v, err := spec.ParseQuantity(text, dim)
		if err != nil {
			return &InputError{Err: fmt.Errorf("flag --%s: %w", flag, err)}
		}
		*dst = v
		return nil
	}
	for _, s := range []struct {
		flag, text string
		dim        spec.Dimension
		dst        *float64
	}{
		{"amplitude-error", f.Amplitude, spec.Number, &m.AmplitudeError},
		{"one-photon-detuning", f.OnePhoton, spec.Frequency, &m.OnePhotonDetuning},
		{"two-photon-detuning", f.TwoPhoton, spec.Frequency, &m.TwoPhotonDetuning},
		{"decay", f.Decay, spec.Rate, &m.Decay},
		{"dephasing", f.Dephasing, spec.Rate, &m.Dephasing},
		{"rise-time", f.RiseTime, spec.Time, &m.RiseTime},
	} {
		if err := set(s.flag, s.text, s.dim, s.dst); err != nil {
			return err
		}
	}
	if f.PhaseStep != "" {
		v, err := spec.ParseQuantity(f.PhaseStep, spec.Angle)
		if err != nil {
			return &InputError{Err: fmt.Errorf("flag --phase-step: %w", err)}
		}
		if v < 0 || v > math.Pi {
			return &InputError{Err: fmt.Errorf("flag --phase-step: %s; need 0 to 180 deg", f.PhaseStep)}
		}
		m.PhaseStep = v
	}
	switch f.Filter {
	case "":
	case "none":
		m.RiseTime = 0
	case "gaussian":
		m.Filter = waveform.GaussianFilter
	case "first-order":
		m.Filter = waveform.FirstOrderFilter
	default:
		return &InputError{Err: fmt.Errorf("flag --filter: %q; expected none, gaussian or first-order", f.Filter)}
	}
	if f.Filter != "" && f.Filter != "none" && m.RiseTime == 0 {
		return &InputError{Err: fmt.Errorf("flag --filter %s needs a rise time: give --rise-time", f.Filter)}
	}
	if f.Amplitude != "" {
		m.ChannelErrors = nil
	}
	if m.AmplitudeError <= -1 {
		return &InputError{Err: fmt.Errorf("flag --amplitude-error: %g would switch the drive off or invert it; need ε > −1", m.AmplitudeError)}
	}
	if m.Decay < 0 || m.Dephasing < 0 || m.RiseTime < 0 {
		return &InputError{Err: fmt.Errorf("flags --decay, --dephasing and --rise-time must not be negative")}
	}
	return nil
}

// VerifyOptions controls VerifyFile.
type VerifyOptions struct {
	// Errors overrides terms of the error model.
	Errors ErrorFlags
	// Report, if not empty, is the path of an HTML report to write.
	Report string
	// Overwrite allows replacing an existing report.
	Overwrite bool
	// NoSweeps skips the robustness sweeps, map and comparison.
	NoSweeps bool
	// Progress, if not nil, receives progress bars.
	Progress io.Writer
}

// VerifyFile reads a waveform file, replays it and re-runs every check.
// The ideal-model figures are recomputed with the model stored in the file
// and compared bit for bit with the stored ones (Outcome.Reproduced); a
// mismatch is a failed check. The error model, sweeps and map come from
// the spec embedded in the file, with ErrorFlags overriding terms.
func VerifyFile(ctx context.Context, path string, opt VerifyOptions) (*Outcome, error) {
	f, err := readWaveformFile(path)
	if err != nil {
		return nil, err
	}
	if f.Spec != "" && wavefile.SpecHash([]byte(f.Spec)) != f.SpecSHA256 {
		return nil, &InputError{Err: fmt.Errorf("waveform %s: /spec: the spec text does not match /spec_sha256 (the file was edited)", path)}
	}
	if opt.Report != "" {
		if err := PrepareOutputDir(filepath.Dir(opt.Report)); err != nil {
			return nil, &OutputError{Err: err}
		}
		if err := CheckOutputs([]string{opt.Report}, opt.Overwrite); err != nil {
			return nil, &OutputError{Err: err}
		}
	}
	w := f.Waveform
	model := waveform.ErrorModel{}
	sp := defaultSweeps()
	title, target, preset := "", targetLabel(w.Target), ""
	if f.Spec != "" {
		spc, err := spec.ParseSpec([]byte(f.Spec), path+" (embedded spec)")
		if err != nil {
			return nil, &InputError{Err: err}
		}
		model, sp = errorModelOf(spc), sweepsOf(spc, w.Duration())
		title, target, preset = spc.Title, spc.Target.Label, spc.Preset
	}
	_ = preset
	if err := opt.Errors.apply(&model); err != nil {
		return nil, err
	}
	if err := checkModels(w, model, sp); err != nil {
		return nil, &InputError{Err: fmt.Errorf("waveform %s: error model: %w", path, err)}
	}
	a, err := analyse(ctx, w, model, sp, !opt.NoSweeps, opt.Progress, nil)
	if err != nil {
		return nil, err
	}
	again, err := waveform.Verify(w, f.Verification.Model)
	if err != nil {
		return nil, fmt.Errorf("waveform %s: %w", path, err)
	}
	same := again.Same(f.Verification)
	o := newOutcome("verify", path, title, target, w, a)
	o.Seed, o.SpecHash = f.Seed, f.SpecSHA256
	o.Reproduced = &same
	if !same {
		o.Pass = false
		o.Checks = append(o.Checks, CheckRow{Name: "reproduces the stored figures", Bound: "equal", Pass: false})
	}
	if opt.Report != "" {
		data := reportData(o, w, nil, a, "")
		if err := WriteAtomic(opt.Report, opt.Overwrite, func(wr io.Writer) error { return writeReport(wr, data) }); err != nil {
			return nil, &OutputError{Err: err}
		}
		o.Files = append(o.Files, opt.Report)
	}
	return o, o.err()
}

// readWaveformFile opens and reads a waveform file with clear messages
// for a missing file, a directory or an empty file.
func readWaveformFile(path string) (*wavefile.File, error) {
	r, err := openInput(path, "waveform file")
	if err != nil {
		return nil, err
	}
	defer r.Close()
	f, err := wavefile.ReadWaveform(r, path)
	if err != nil {
		return nil, &InputError{Err: err}
	}
	return f, nil
}

// openInput opens path for reading, refusing directories.
func openInput(path, what string) (*os.File, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, &InputError{Err: fmt.Errorf("%s %s: %w", what, path, unwrapPath(err))}
	}
	if st.IsDir() {
		return nil, &InputError{Err: fmt.Errorf("%s %s: is a directory; expected a file", what, path)}
	}
	r, err := os.Open(path)
	if err != nil {
		return nil, &InputError{Err: fmt.Errorf("%s %s: %w", what, path, unwrapPath(err))}
	}
	return r, nil
}

// defaultSweeps is used for waveform files without an embedded spec.
func defaultSweeps() sweepPlan {
	amp := waveform.Range{Axis: waveform.AmplitudeAxis, Min: -0.1, Max: 0.1, Points: 21}
	det := waveform.Range{Axis: waveform.TwoPhotonAxis, Min: -1e6, Max: 1e6, Points: 21}
	return sweepPlan{amplitude: amp, detuning: det, mapX: amp, mapY: det}
}
