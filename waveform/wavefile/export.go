package wavefile

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"github.com/loopgate/loopgate/waveform"
	"io"
	"math"
	"strconv"
	"strings"
)

// CSVColumns returns the header of WriteCSV: sample, time_s, then for
// every channel <name>_i_hz, <name>_q_hz, <name>_amplitude_hz,
// <name>_phase_rad, <name>_i_code, <name>_q_code, then <level>_detuning_hz
// for every level with a detuning track.
func CSVColumns(w *waveform.Waveform) []string {
	cols := []string{"sample", "time_s"}
	for _, ch := range w.Scheme.Channels {
		for _, s := range []string{"_i_hz", "_q_hz", "_amplitude_hz", "_phase_rad", "_i_code", "_q_code"} {
			cols = append(cols, ch.Name+s)
		}
	}
	for l, tr := range w.Detuning {
		if tr != nil {
			cols = append(cols, w.Scheme.Levels[l].Name+"_detuning_hz")
		}
	}
	return cols
}

// WriteCSV writes one row per sample after a header row (CSVColumns).
// time_s is the start of the sample's hold interval, k/SampleRate; I, Q,
// amplitude |I + iQ| and phase atan2(Q, I) are the unquantised values (Hz,
// rad) and the codes the DAC codes. Numbers use the shortest decimal form
// that reads back exactly. Names containing a comma, quote or line break
// are quoted as in RFC 4180.
func WriteCSV(out io.Writer, w *waveform.Waveform) error {
	bw := bufio.NewWriter(out)
	cols := CSVColumns(w)
	for i, c := range cols {
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString(csvField(c))
	}
	bw.WriteByte('\n')
	buf := make([]byte, 0, 32)
	num := func(x float64) {
		bw.WriteByte(',')
		buf = strconv.AppendFloat(buf[:0], x, 'g', -1, 64)
		bw.Write(buf)
	}
	rate := w.Hardware.SampleRate
	for k := 0; k < w.Len(); k++ {
		bw.WriteString(strconv.Itoa(k))
		num(float64(k) / rate)
		for c := range w.Scheme.Channels {
			i, q := w.I[c][k], w.Q[c][k]
			num(i)
			num(q)
			num(math.Hypot(i, q))
			num(math.Atan2(q, i))
			bw.WriteByte(',')
			bw.WriteString(strconv.Itoa(int(w.CodeI[c][k])))
			bw.WriteByte(',')
			bw.WriteString(strconv.Itoa(int(w.CodeQ[c][k])))
		}
		for _, tr := range w.Detuning {
			if tr != nil {
				num(tr[k])
			}
		}
		bw.WriteByte('\n')
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing CSV: %w", err)
	}
	return nil
}

func csvField(s string) string {
	if !strings.ContainsAny(s, ",\"\r\n") {
		return s
	}
	return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
}

// NPYColumns returns the column order of WriteNPY: time_s, then for every
// channel <name>_i_hz and <name>_q_hz (unquantised), then for every channel
// <name>_i_code and <name>_q_code (DAC codes as float64, exact), then
// <level>_detuning_hz for every level with a detuning track.
func NPYColumns(w *waveform.Waveform) []string {
	cols := []string{"time_s"}
	for _, ch := range w.Scheme.Channels {
		cols = append(cols, ch.Name+"_i_hz", ch.Name+"_q_hz")
	}
	for _, ch := range w.Scheme.Channels {
		cols = append(cols, ch.Name+"_i_code", ch.Name+"_q_code")
	}
	for l, tr := range w.Detuning {
		if tr != nil {
			cols = append(cols, w.Scheme.Levels[l].Name+"_detuning_hz")
		}
	}
	return cols
}

// WriteNPY writes the samples as a NumPy .npy file, format version 1.0:
// a C-order float64 ('<f8', little-endian) array of shape (samples,
// len(NPYColumns(w))), one row per sample, columns as NPYColumns. The
// header is padded with spaces and ends in a newline so that the data
// start at a multiple of 64 bytes.
func WriteNPY(out io.Writer, w *waveform.Waveform) error {
	cols := NPYColumns(w)
	n, m := w.Len(), len(cols)
	hdr := npyHeader(n, m)
	bw := bufio.NewWriter(out)
	bw.Write(hdr)
	var b [8]byte
	put := func(x float64) {
		binary.LittleEndian.PutUint64(b[:], math.Float64bits(x))
		bw.Write(b[:])
	}
	rate := w.Hardware.SampleRate
	nch := len(w.Scheme.Channels)
	for k := 0; k < n; k++ {
		put(float64(k) / rate)
		for c := 0; c < nch; c++ {
			put(w.I[c][k])
			put(w.Q[c][k])
		}
		for c := 0; c < nch; c++ {
			put(float64(w.CodeI[c][k]))
			put(float64(w.CodeQ[c][k]))
		}
		for _, tr := range w.Detuning {
			if tr != nil {
				put(tr[k])
			}
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing NPY: %w", err)
	}
	return nil
}

// npyHeader returns the magic string, version 1.0, header length and the
// padded header dictionary for a (rows, cols) float64 array.
func npyHeader(rows, cols int) []byte {
	dict := fmt.Sprintf("{'descr': '<f8', 'fortran_order': False, 'shape': (%d, %d), }", rows, cols)
	const pre = 10 // magic (6) + version (2) + header length (2)
	total := pre + len(dict) + 1
	pad := (64 - total%64) % 64
	h := make([]byte, 0, total+pad)
	h = append(h, "\x93NUMPY"...)
	h = append(h, 1, 0)
	hl := len(dict) + pad + 1
	h = append(h, byte(hl), byte(hl>>8))
	h = append(h, dict...)
	for i := 0; i < pad; i++ {
		h = append(h, ' ')
	}
	return append(h, '\n')
}
