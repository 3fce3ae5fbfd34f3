package wavefile

import (
	"bytes"
	"errors"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"io"
	"math"
	"strings"
	"testing"
)

// smallWaveformFile returns a valid waveform file of a few samples: a Λ
// gate at 100 MS/s.
func smallWaveformFile(tb testing.TB, m waveform.ErrorModel) []byte {
	hw := wavetest.Hardware(2, 10e6)
	hw.SampleRate = 1e8
	hw.Granularity = 4
	return encode(tb, testFile(tb, wavetest.LambdaPlan(math.Pi/4, 0.3, wavetest.NDotSigma(math.Pi/4, 0.3)), hw, m))
}

func smallLoopFile(tb testing.TB) []byte {
	lf, err := NewLoopFile(wavetest.TripodPlan(math.Pi/4, 0.05), "slice", []float64{math.Pi / 4}, 6)
	if err != nil {
		tb.Fatal(err)
	}
	var b bytes.Buffer
	if err := lf.WriteJSON(&b); err != nil {
		tb.Fatal(err)
	}
	return b.Bytes()
}

// seeds adds a document, truncations of it and a few edits.
func seeds(f *testing.F, doc []byte) {
	f.Add(doc)
	for _, n := range []int{0, 1, len(doc) / 3, len(doc) / 2, len(doc) - 2} {
		f.Add(doc[:n])
	}
	s := string(doc)
	for _, r := range [][2]string{
		{`"version": 1`, `"version": 2`},
		{`"samples": `, `"samples": 1e300, "x": `},
		{`: 0,`, `: -1e-320,`},
		{`"g1"`, `"e"`},
		{`"adiabatic"`, `"cyclic"`},
		{`[`, `[[`},
		{`"s": 0,`, `"s": 0.5,`},
	} {
		f.Add([]byte(strings.Replace(s, r[0], r[1], 1)))
	}
	f.Add([]byte("null"))
	f.Add([]byte(`{"format":"loopgate-waveform","version":1}`))
	f.Add([]byte("\xef\xbb\xbf{}"))
}

// FuzzReadWaveform: any input gives a *FileError or a file that writes
// back and re-reads to the same bytes; small files also verify without
// panicking.
func FuzzReadWaveform(f *testing.F) {
	seeds(f, smallWaveformFile(f, waveform.ErrorModel{}))
	seeds(f, smallWaveformFile(f, waveform.ErrorModel{AmplitudeError: 0.1, ChannelErrors: []float64{0.01, 0.02}, Decay: 1e5, Dephasing: 1e4, RiseTime: 3e-9}))
	seeds(f, smallWaveformFile(f, waveform.ErrorModel{Filter: waveform.FirstOrderFilter, RiseTime: 3e-9, PhaseStep: 2 * math.Pi / 64}))
	seeds(f, smallWaveformFile(f, waveform.ErrorModel{PhaseStep: math.Pi / 8}))
	f.Fuzz(func(t *testing.T, data []byte) {
		file := fuzzRoundTrip(t, data, ReadWaveform, (*File).WriteJSON)
		if file == nil {
			return
		}
		// Small files must also verify without panicking (the slower
		// density-matrix and filter paths are left to the unit tests).
		if m := file.Verification.Model; file.Waveform.Len() <= 64 && m.Dephasing == 0 && m.RiseTime == 0 {
			waveform.Verify(file.Waveform, m)
		}
	})
}

// FuzzReadLoop: any input gives a *FileError or a loop file that writes
// back and re-reads to the same bytes and whose shapes can be evaluated.
func FuzzReadLoop(f *testing.F) {
	seeds(f, smallLoopFile(f))
	lc, _ := NewLoopFile(wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), "lambda", nil, 8)
	var b bytes.Buffer
	lc.WriteJSON(&b)
	seeds(f, b.Bytes())
	f.Fuzz(func(t *testing.T, data []byte) {
		l := fuzzRoundTrip(t, data, ReadLoop, (*LoopFile).WriteJSON)
		if l == nil {
			return
		}
		for i := range l.Segments {
			pt := l.Scheme.NewPoint()
			for _, s := range []float64{0, 0.3, 0.999, 1} {
				l.Shape(i)(s, pt)
			}
		}
	})
}

// fuzzRoundTrip reads data with read: a failure must be a *FileError (nil
// is returned); a success must write back, re-read and write again to the
// same bytes (the value read is returned).
func fuzzRoundTrip[T any](t *testing.T, data []byte, read func(io.Reader, string) (*T, error), write func(*T, io.Writer) error) *T {
	t.Helper()
	v, err := read(bytes.NewReader(data), "fuzz.json")
	if err != nil {
		var fe *FileError
		if !errors.As(err, &fe) {
			t.Fatalf("error is not a *FileError: %v", err)
		}
		return nil
	}
	var b1, b2 bytes.Buffer
	if err := write(v, &b1); err != nil {
		t.Fatalf("a file that reads does not write: %v", err)
	}
	again, err := read(bytes.NewReader(b1.Bytes()), "again.json")
	if err != nil {
		t.Fatalf("a written file does not read: %v", err)
	}
	if err := write(again, &b2); err != nil || !bytes.Equal(b1.Bytes(), b2.Bytes()) {
		t.Fatalf("write → read → write is not stable (%v)", err)
	}
	return v
}
