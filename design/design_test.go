package design

import (
	"bytes"
	"context"
	"errors"
	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/waveform/wavefile"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/xeipuuv/gojsonschema"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/optimize"
	"github.com/loopgate/loopgate/schemas"
	"github.com/loopgate/loopgate/waveform"
)

// demoSpecs are the shipped demo specs: H, T and √X on the tripod
// (adiabatic holonomy; Duan, Cirac and Zoller, Science 292, 1695 (2001))
// and on the Λ system (nonadiabatic holonomy; Sjöqvist et al., New J.
// Phys. 14, 103035 (2012)). The hardware numbers in them are invented.
var demoSpecs = []string{
	"demo-tripod-hadamard.yaml", "demo-tripod-t.yaml", "demo-tripod-sx.yaml",
	"demo-lambda-hadamard.yaml", "demo-lambda-t.yaml", "demo-lambda-sx.yaml",
}

func loadDemo(t testing.TB, name string) *spec.Spec {
	t.Helper()
	spc, err := spec.LoadSpec(filepath.Join("..", "testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	return spc
}

// validate checks a file against one of the shipped JSON Schemas.
func validate(t *testing.T, schema []byte, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	res, err := gojsonschema.Validate(gojsonschema.NewBytesLoader(schema), gojsonschema.NewBytesLoader(data))
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	for _, e := range res.Errors() {
		t.Errorf("%s: %s", path, e)
	}
}

// TestDesignDemoGates designs every demo gate and checks that the ideal
// model of the sampled, quantised waveform reaches F ≥ 0.9999 within the
// demo hardware limits, and that the files validate against the schemas.
func TestDesignDemoGates(t *testing.T) {
	for _, name := range demoSpecs {
		t.Run(name, func(t *testing.T) {
			spc := loadDemo(t, name)
			dir := t.TempDir()
			out, err := Design(context.Background(), spc, Options{OutDir: dir, NoSweeps: true})
			if err != nil {
				t.Fatalf("design: %v", err)
			}
			if out.Ideal.Fidelity < 0.9999 || !out.Pass {
				t.Errorf("ideal fidelity %.8f, pass %v; want ≥ 0.9999 and every check passing", out.Ideal.Fidelity, out.Pass)
			}
			for _, c := range out.Checks {
				if !c.Pass {
					t.Errorf("check %s failed: %v vs %v", c.Name, c.Value, c.Limit)
				}
			}
			validate(t, schemas.Waveform, filepath.Join(dir, WaveformFile))
			validate(t, schemas.Loop, filepath.Join(dir, LoopFile))
		})
	}
}

// TestVerifyReproducesDesign checks that verifying a designed file gives
// the design's figures exactly.
func TestVerifyReproducesDesign(t *testing.T) {
	for _, name := range []string{"demo-tripod-hadamard.yaml", "demo-lambda-t.yaml"} {
		t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			d, err := Design(context.Background(), loadDemo(t, name), Options{OutDir: dir, NoSweeps: true, NoReport: true})
			if err != nil {
				t.Fatal(err)
			}
			v, err := VerifyFile(context.Background(), filepath.Join(dir, WaveformFile), VerifyOptions{NoSweeps: true})
			if err != nil {
				t.Fatal(err)
			}
			if v.Reproduced == nil || !*v.Reproduced {
				t.Fatal("verify did not reproduce the stored figures")
			}
			if !equalFigures(d.Ideal, v.Ideal) || !equalFigures(d.WithErrors, v.WithErrors) {
				t.Errorf("figures differ:\ndesign %+v / %+v\nverify %+v / %+v", d.Ideal, d.WithErrors, v.Ideal, v.WithErrors)
			}
			if len(d.Budget) != len(v.Budget) {
				t.Fatalf("budget has %d lines after design, %d after verify", len(d.Budget), len(v.Budget))
			}
			for i := range d.Budget {
				if d.Budget[i] != v.Budget[i] {
					t.Errorf("budget line %d: %+v vs %+v", i, d.Budget[i], v.Budget[i])
				}
			}
		})
	}
}

func equalFigures(a, b Figures) bool {
	if a.Fidelity != b.Fidelity || a.Leakage != b.Leakage || len(a.PeakAux) != len(b.PeakAux) {
		return false
	}
	for i := range a.PeakAux {
		if a.PeakAux[i] != b.PeakAux[i] {
			return false
		}
	}
	if (a.Adiabaticity == nil) != (b.Adiabaticity == nil) {
		return false
	}
	return a.Adiabaticity == nil || *a.Adiabaticity == *b.Adiabaticity
}

// smallSweeps shrinks a demo spec's sweeps so that a full design (sweeps,
// map, comparison and report) runs quickly in tests.
func smallSweeps(t testing.TB, name string) *spec.Spec {
	t.Helper()
	src, err := os.ReadFile(filepath.Join("..", "testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	s := string(src)
	for _, r := range [][2]string{{"points: 41", "points: 7"}, {"amplitude_points: 41", "amplitude_points: 5"}, {"detuning_points: 41", "detuning_points: 5"}} {
		s = strings.ReplaceAll(s, r[0], r[1])
	}
	spc, err := spec.ParseSpec([]byte(s), name)
	if err != nil {
		t.Fatal(err)
	}
	return spc
}

// TestDesignDeterministic runs a full design twice, with one and with two
// threads, and compares every output file byte for byte.
func TestDesignDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("full design twice")
	}
	spc := smallSweeps(t, "demo-tripod-hadamard.yaml")
	dirs := []string{t.TempDir(), t.TempDir()}
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	for i, procs := range []int{1, 2} {
		runtime.GOMAXPROCS(procs)
		if _, err := Design(context.Background(), spc, Options{OutDir: dirs[i]}); err != nil {
			t.Fatalf("GOMAXPROCS=%d: %v", procs, err)
		}
	}
	for _, name := range []string{WaveformFile, CSVFile, NPYFile, LoopFile, ReportFile} {
		a, err := os.ReadFile(filepath.Join(dirs[0], name))
		if err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(dirs[1], name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between GOMAXPROCS=1 and 2", name)
		}
	}
}

// TestDesignOutputs checks that existing outputs are refused before any
// work (naming the flag), that --overwrite replaces them, and that an
// interrupted run leaves no file behind.
func TestDesignOutputs(t *testing.T) {
	spc := loadDemo(t, "demo-lambda-hadamard.yaml")
	dir := t.TempDir()
	opt := Options{OutDir: dir, NoSweeps: true, NoReport: true}
	if _, err := Design(context.Background(), spc, opt); err != nil {
		t.Fatal(err)
	}
	_, err := Design(context.Background(), spc, opt)
	var oe *OutputError
	if !errors.As(err, &oe) || !strings.Contains(err.Error(), "--overwrite") || ExitCode(err) != ExitOutput {
		t.Fatalf("second run: got %v (exit %d); want an output error naming --overwrite", err, ExitCode(err))
	}
	opt.Overwrite = true
	if _, err := Design(context.Background(), spc, opt); err != nil {
		t.Fatalf("with overwrite: %v", err)
	}

	empty := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = Design(ctx, spc, Options{OutDir: empty, NoSweeps: true})
	if !errors.Is(err, context.Canceled) || ExitCode(err) != ExitInterrupted {
		t.Fatalf("cancelled run: got %v; want context.Canceled", err)
	}
	entries, _ := os.ReadDir(empty)
	if len(entries) != 0 {
		t.Errorf("cancelled run left %d files", len(entries))
	}
}

// TestDesignUnreachable asks a spin-½ loop for a Hadamard gate: its
// holonomy is diagonal (Berry, Proc. R. Soc. A 392, 45 (1984)), so the
// design must refuse with the reason instead of returning a wrong gate.
func TestDesignUnreachable(t *testing.T) {
	src, err := spec.StarterSpec("spin-1/2")
	if err != nil {
		t.Fatal(err)
	}
	s := string(src)
	i := strings.Index(s, "gate:")
	if i < 0 {
		t.Fatal("starter spec has no gate field")
	}
	end := strings.Index(s[i:], "\n")
	s = s[:i] + "gate: H" + s[i+end:]
	spc, err := spec.ParseSpec([]byte(s), "spin-h.yaml")
	if err != nil {
		t.Fatal(err)
	}
	_, err = Design(context.Background(), spc, Options{OutDir: t.TempDir(), NoSweeps: true, NoReport: true})
	var ie *InfeasibleError
	if !errors.As(err, &ie) || ExitCode(err) != ExitInfeasible || !strings.Contains(err.Error(), "diagonal") {
		t.Fatalf("got %v; want an infeasible-target error explaining that only diagonal gates are reachable", err)
	}
}

// TestCheckLoopFile checks a designed loop file: its holonomy is the
// target, and asking for another gate fails the check.
func TestCheckLoopFile(t *testing.T) {
	for _, name := range []string{"demo-tripod-hadamard.yaml", "demo-lambda-sx.yaml"} {
		t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			if _, err := Design(context.Background(), loadDemo(t, name), Options{OutDir: dir, NoSweeps: true, NoReport: true}); err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(dir, LoopFile)
			c, err := CheckLoopFile(context.Background(), path, CheckOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if c.Fidelity < 1-1e-5 {
				t.Errorf("loop file holonomy fidelity %.9f; want ≥ 1 − 1e-5", c.Fidelity)
			}
			c, err = CheckLoopFile(context.Background(), path, CheckOptions{Target: "Z"})
			var cf *ChecksFailedError
			if !errors.As(err, &cf) || c == nil || c.Fidelity > 0.9 {
				t.Errorf("against Z: fidelity %v, err %v; want a failed check", c, err)
			}
		})
	}
}

// benchDesign measures the default end-to-end design of a demo spec:
// search, timing, verification, budget, sweeps, 41×41 map, comparison
// and report.
func benchDesign(b *testing.B, name string) {
	spc := loadDemo(b, name)
	dir := b.TempDir()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Design(context.Background(), spc, Options{OutDir: dir, Overwrite: true}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkDesignTripodH(b *testing.B)  { benchDesign(b, "demo-tripod-hadamard.yaml") }
func BenchmarkDesignTripodT(b *testing.B)  { benchDesign(b, "demo-tripod-t.yaml") }
func BenchmarkDesignTripodSX(b *testing.B) { benchDesign(b, "demo-tripod-sx.yaml") }
func BenchmarkDesignLambdaH(b *testing.B)  { benchDesign(b, "demo-lambda-hadamard.yaml") }
func BenchmarkDesignLambdaT(b *testing.B)  { benchDesign(b, "demo-lambda-t.yaml") }
func BenchmarkDesignLambdaSX(b *testing.B) { benchDesign(b, "demo-lambda-sx.yaml") }

// TestDesignHardwareImpossible shortens the longest allowed gate below
// what a cyclic Λ gate needs at the peak Rabi frequency (area 2π, Sjöqvist
// et al., New J. Phys. 14, 103035 (2012)): the design must refuse, name
// the limit and write nothing.
func TestDesignHardwareImpossible(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "testdata", "demo-lambda-hadamard.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(src)
	i := strings.Index(s, "max_duration:")
	end := strings.Index(s[i:], "\n")
	s = s[:i] + `max_duration: "60 ns"` + s[i+end:]
	s = strings.Replace(s, `min_duration: "50 ns"`, `min_duration: "10 ns"`, 1)
	spc, err := spec.ParseSpec([]byte(s), "short.yaml")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	_, err = Design(context.Background(), spc, Options{OutDir: dir, NoSweeps: true})
	var ie *InfeasibleError
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "duration") || !strings.Contains(err.Error(), "60 ns") {
		t.Fatalf("got %v; want an infeasible error naming the duration limit", err)
	}
	t.Log(err)
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("refused design left %d files", len(entries))
	}
}

// TestStartersDesign designs the gate of every starter spec: what
// `loopgate starter` writes must work as written.
func TestStartersDesign(t *testing.T) {
	for _, p := range spec.StarterPresets() {
		t.Run(p, func(t *testing.T) {
			src, err := spec.StarterSpec(p)
			if err != nil {
				t.Fatal(err)
			}
			spc, err := spec.ParseSpec(src, p+".yaml")
			if err != nil {
				t.Fatal(err)
			}
			out, err := Design(context.Background(), spc, Options{OutDir: t.TempDir(), NoSweeps: true, NoReport: true})
			if err != nil {
				t.Fatalf("design: %v", err)
			}
			if out.Ideal.Fidelity < 0.9999 {
				t.Errorf("fidelity %.6f < 0.9999", out.Ideal.Fidelity)
			}
		})
	}
}

// TestAmplitudePenalty checks the search's hardware penalty: none with
// equal Rabi limits, none for a loop that stays at the base point (only
// the auxiliary channel on), and a positive one for a loop that drives a
// channel whose limit is a tenth of the others' at full strength.
func TestAmplitudePenalty(t *testing.T) {
	sc := holonomy.Tripod()
	sp, err := optimize.NewDriveSphere(sc, false)
	if err != nil {
		t.Fatal(err)
	}
	shape := optimize.NewFourier(sp, 1)
	if amplitudePenalty(sc, shape, []float64{20e6, 20e6, 20e6}) != nil {
		t.Error("equal limits gave a penalty")
	}
	pen := amplitudePenalty(sc, shape, []float64{20e6, 2e6, 20e6})
	x := make([]float64, shape.NumParams())
	if v := pen(x); v != 0 {
		t.Errorf("base-point loop: penalty %g, want 0", v)
	}
	// Move the loop onto channel p1 (coordinates Re w1, Im w1 are 2 and 3
	// of each 6-vector of Fourier coefficients).
	x[2] = 3
	if v := pen(x); !(v > 0) {
		t.Errorf("loop through the weak channel: penalty %g, want > 0", v)
	}
}

// TestRobustDesign runs the robust-design option on the Λ T gate: the
// search minimises the mean infidelity over amplitude errors ±5 % and
// one-photon detunings ±200 kHz. The outcome must report the ensemble on
// the built waveform, and those figures must agree with an independent
// simulation of the waveform file read back from disk.
func TestRobustDesign(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "testdata", "demo-lambda-t.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(src)
	i := strings.Index(s, "search:")
	j := i + strings.Index(s[i:], "\n\n")
	s = s[:j] + "\n  robust:\n    amplitude: 0.05\n    detuning: \"200 kHz\"\n    detuning_kind: one-photon" + s[j:]
	spc, err := spec.ParseSpec([]byte(s), "robust.yaml")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	out, err := Design(context.Background(), spc, Options{OutDir: dir, NoSweeps: true, NoReport: true})
	if err != nil {
		t.Fatal(err)
	}
	r := out.Search.Robust
	if r == nil || r.Members != 9 || len(r.Built) != 9 || out.Ideal.Fidelity < 0.9999 {
		t.Fatalf("robust summary %+v, ideal fidelity %.6f; want 9 members simulated on the built waveform", r, out.Ideal.Fidelity)
	}
	f, err := os.Open(filepath.Join(dir, WaveformFile))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	file, err := wavefile.ReadWaveform(f, "waveform.json")
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range r.Built {
		o, err := waveform.Simulate(file.Waveform, waveform.ErrorModel{AmplitudeError: m.Amplitude, OnePhotonDetuning: m.Detuning})
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs((1 - o.Fidelity) - m.Infidelity); d > 1e-12 {
			t.Errorf("member ε = %g, δ = %g Hz: reported %.6g, file replay %.6g", m.Amplitude, m.Detuning, m.Infidelity, 1-o.Fidelity)
		}
		if m.Amplitude == 0 && m.Detuning == 0 && math.Abs(m.Infidelity-(1-out.Ideal.Fidelity)) > 1e-12 {
			t.Errorf("the error-free member %.6g differs from the ideal verification %.6g", m.Infidelity, 1-out.Ideal.Fidelity)
		}
	}
	t.Logf("search model: mean %.4g → %.4g; built waveform: mean %.4g, worst %.4g", r.NominalMean, r.RobustMean, r.BuiltMean, r.BuiltWorst)
}

// TestDesignAbsurdRates gives a dephasing rate that acts 1e10 times per
// sample: it must be refused as bad input, quickly, not simulated.
func TestDesignAbsurdRates(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "testdata", "demo-lambda-hadamard.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(src)
	i := strings.Index(s, "dephasing:")
	if i < 0 {
		t.Fatal("demo spec has no dephasing")
	}
	end := strings.Index(s[i:], "\n")
	s = s[:i] + `dephasing: "1e9 GHz"` + s[i+end:]
	spc, err := spec.ParseSpec([]byte(s), "absurd.yaml")
	if err != nil {
		t.Fatal(err)
	}
	_, err = Design(context.Background(), spc, Options{OutDir: t.TempDir(), NoSweeps: true, NoReport: true})
	if ExitCode(err) != ExitBadInput || !strings.Contains(err.Error(), "absurd.yaml") || !strings.Contains(err.Error(), "per sample") {
		t.Fatalf("got %v (exit %d); want bad input naming the file and the rate", err, ExitCode(err))
	}
}
