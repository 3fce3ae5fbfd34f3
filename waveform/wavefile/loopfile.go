package wavefile

import (
	"errors"
	"fmt"
	"github.com/loopgate/loopgate/waveform"
	"io"

	"github.com/loopgate/loopgate/holonomy"
)

// LoopFile is a loop file (schemas.Loop): the segments of a gate as
// sampled unit-scale control points, with the level scheme, the target and
// the loop family and parameters the search found.
type LoopFile struct {
	// ToolVersion, SpecSHA256 and Seed record where the loop came from.
	ToolVersion string
	SpecSHA256  string
	Seed        uint64
	// Scheme is the level scheme; its level detunings are exactly 2π times
	// the Hz values written to the file.
	Scheme *holonomy.Scheme
	// Target is the d×d target unitary.
	Target *holonomy.Mat
	// Family names the loop family and Parameters are its parameters, in
	// the family's documented order (informative: the points define the
	// loop).
	Family     string
	Parameters []float64
	// Segments are the gate's segments in time order.
	Segments []LoopSegment

	levelHz []float64
}

// LoopSegment is one segment of a loop file.
type LoopSegment struct {
	// Kind is the segment's kind.
	Kind waveform.Kind
	// Area is the pulse area (rad) of a cyclic segment.
	Area float64
	// S holds the loop parameters of the points: S[0] = 0, strictly
	// increasing, below 1. A cyclic segment has one point.
	S []float64
	// Points are the unit-scale control points.
	Points []holonomy.Point
}

// MaxLoopPoints is the largest number of points per segment of a loop
// file.
const MaxLoopPoints = 65536

// NewLoopFile samples the segments of p: an adiabatic shape at n points
// s = j/n, j = 0 … n−1 (n from 4 to MaxLoopPoints), a cyclic segment at
// s = 0 only. family and params are recorded as given.
func NewLoopFile(p *waveform.Plan, family string, params []float64, n int) (*LoopFile, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if n < 4 || n > MaxLoopPoints {
		return nil, fmt.Errorf("loop file: %d points per loop; need 4 to %d", n, MaxLoopPoints)
	}
	sc, hz := waveform.CanonScheme(p.Scheme)
	lf := &LoopFile{
		Scheme: sc, Target: p.Target.Clone(), Family: family,
		Parameters: append([]float64(nil), params...), levelHz: hz,
	}
	for i, seg := range p.Segments {
		ls := LoopSegment{Kind: seg.Kind, Area: 0}
		m := n
		if seg.Kind == waveform.Cyclic {
			m = 1
			ls.Area = seg.Area
		}
		for j := 0; j < m; j++ {
			s := float64(j) / float64(m)
			pt := sc.NewPoint()
			seg.Shape(s, pt)
			if err := sc.CheckPoint(pt); err != nil {
				return nil, fmt.Errorf("loop file: segment %d at s = %g: %w", i, s, err)
			}
			ls.S = append(ls.S, s)
			ls.Points = append(ls.Points, pt)
		}
		lf.Segments = append(lf.Segments, ls)
	}
	return lf, nil
}

// Shape returns the loop of segment i: the straight lines between its
// points, closed from the last point back to the first at s = 1. The
// returned Loop does not allocate.
func (l *LoopFile) Shape(i int) holonomy.Loop {
	seg := l.Segments[i]
	return func(s float64, p holonomy.Point) {
		n := len(seg.S)
		if n == 1 || s <= 0 || s >= 1 {
			copyPoint(p, seg.Points[0])
			return
		}
		// Find j with S[j] ≤ s < S[j+1] (S[n] = 1 is Points[0] again).
		lo, hi := 0, n
		for hi-lo > 1 {
			m := (lo + hi) / 2
			if seg.S[m] <= s {
				lo = m
			} else {
				hi = m
			}
		}
		a := seg.Points[lo]
		b, sb := seg.Points[0], 1.0
		if lo+1 < n {
			b, sb = seg.Points[lo+1], seg.S[lo+1]
		}
		f := (s - seg.S[lo]) / (sb - seg.S[lo])
		for c := range p.Drive {
			p.Drive[c] = a.Drive[c] + complex(f, 0)*(b.Drive[c]-a.Drive[c])
		}
		for k := range p.Detuning {
			p.Detuning[k] = a.Detuning[k] + f*(b.Detuning[k]-a.Detuning[k])
		}
	}
}

func copyPoint(dst, src holonomy.Point) {
	copy(dst.Drive, src.Drive)
	if dst.Detuning != nil {
		copy(dst.Detuning, src.Detuning)
	}
}

// Plan returns a plan whose segments follow the loop file's points (see
// Shape), with the given goals (zero for the defaults).
func (l *LoopFile) Plan(adiabaticity, minFidelity float64) *waveform.Plan {
	p := &waveform.Plan{Scheme: l.Scheme, Target: l.Target, Adiabaticity: adiabaticity, MinFidelity: minFidelity}
	for i, s := range l.Segments {
		p.Segments = append(p.Segments, waveform.Segment{Kind: s.Kind, Shape: l.Shape(i), Area: s.Area})
	}
	return p
}

type loopDoc struct {
	Format      string           `json:"format"`
	Version     int              `json:"version"`
	ToolVersion string           `json:"tool_version"`
	SpecSHA256  string           `json:"spec_sha256"`
	Seed        uint64           `json:"seed"`
	Scheme      schemeDoc        `json:"scheme"`
	Target      matDoc           `json:"target"`
	Family      string           `json:"family"`
	Parameters  []float64        `json:"parameters"`
	Segments    []loopSegmentDoc `json:"segments"`
}

type loopSegmentDoc struct {
	Kind   string         `json:"kind"`
	Area   float64        `json:"area_rad"`
	Points []loopPointDoc `json:"points"`
}

type loopPointDoc struct {
	S        float64   `json:"s"`
	Re       []float64 `json:"re"`
	Im       []float64 `json:"im"`
	Detuning []float64 `json:"detuning,omitempty"`
}

// WriteJSON writes l as a loop file (schemas.Loop) to w; the output is a
// deterministic function of l.
func (l *LoopFile) WriteJSON(w io.Writer) error {
	if l.Scheme == nil || l.Target == nil || len(l.Segments) == 0 {
		return errors.New("loop file needs a scheme, a target and at least one segment")
	}
	hz := l.levelHz
	if hz == nil {
		_, hz = waveform.CanonScheme(l.Scheme)
	}
	d := loopDoc{
		Format: LoopFormat, Version: FormatVersion,
		ToolVersion: l.ToolVersion, SpecSHA256: l.SpecSHA256, Seed: l.Seed,
		Scheme: newSchemeDoc(l.Scheme, hz), Target: newMatDoc(l.Target),
		Family: l.Family, Parameters: orEmpty(l.Parameters),
	}
	for _, s := range l.Segments {
		sd := loopSegmentDoc{Kind: s.Kind.String(), Area: s.Area, Points: []loopPointDoc{}}
		for j, p := range s.Points {
			pd := loopPointDoc{S: s.S[j], Re: make([]float64, len(p.Drive)), Im: make([]float64, len(p.Drive))}
			for c, v := range p.Drive {
				pd.Re[c], pd.Im[c] = real(v), imag(v)
			}
			for _, v := range p.Detuning {
				if v != 0 {
					pd.Detuning = append([]float64(nil), p.Detuning...)
					break
				}
			}
			sd.Points = append(sd.Points, pd)
		}
		d.Segments = append(d.Segments, sd)
	}
	b, err := marshalDoc(&d)
	if err != nil {
		return fmt.Errorf("encoding loop file: %w", err)
	}
	if _, err := w.Write(b); err != nil {
		return fmt.Errorf("writing loop file: %w", err)
	}
	return nil
}

// ReadLoop reads a loop file: size, emptiness, JSON syntax, format name and
// version, schema validation (schemas.Loop), then the checks the schema
// cannot make (level names, target shape and unitarity, point dimensions,
// increasing loop parameters, one point per cyclic segment, positive
// cyclic areas). Every error is a *FileError naming the file and the JSON
// pointer of the problem.
func ReadLoop(r io.Reader, name string) (*LoopFile, error) {
	var d loopDoc
	if err := readDoc(r, name, LoopFormat, &d); err != nil {
		return nil, err
	}
	sc, hz, err := parseScheme(name, "/scheme", &d.Scheme)
	if err != nil {
		return nil, err
	}
	target, err := parseTarget(name, "/target", &d.Target, len(sc.Computational))
	if err != nil {
		return nil, err
	}
	l := &LoopFile{
		ToolVersion: d.ToolVersion, SpecSHA256: d.SpecSHA256, Seed: d.Seed,
		Scheme: sc, Target: target, Family: d.Family, Parameters: d.Parameters, levelHz: hz,
	}
	nch, nlev := len(sc.Channels), sc.Dim()
	for i, s := range d.Segments {
		p := fmt.Sprintf("/segments/%d", i)
		kind, err := waveform.ParseKind(s.Kind)
		if err != nil {
			return nil, ferr(name, p+"/kind", "%v", err)
		}
		ls := LoopSegment{Kind: kind, Area: s.Area}
		if kind == waveform.Cyclic {
			if len(s.Points) != 1 {
				return nil, ferr(name, p+"/points", "a cyclic segment has exactly one point, not %d", len(s.Points))
			}
			if !(s.Area > 0) {
				return nil, ferr(name, p+"/area_rad", "a cyclic segment needs a positive pulse area")
			}
		} else if len(s.Points) < 2 {
			return nil, ferr(name, p+"/points", "an adiabatic segment needs at least 2 points, has %d", len(s.Points))
		}
		for j, pd := range s.Points {
			pp := fmt.Sprintf("%s/points/%d", p, j)
			if len(pd.Re) != nch || len(pd.Im) != nch {
				return nil, ferr(name, pp, "%d real and %d imaginary drive values for %d channels", len(pd.Re), len(pd.Im), nch)
			}
			if pd.Detuning != nil && len(pd.Detuning) != nlev {
				return nil, ferr(name, pp+"/detuning", "%d detunings for %d levels", len(pd.Detuning), nlev)
			}
			if j == 0 && pd.S != 0 {
				return nil, ferr(name, pp+"/s", "the first point must be at s = 0, not %g", pd.S)
			}
			if j > 0 && !(pd.S > s.Points[j-1].S) {
				return nil, ferr(name, pp+"/s", "loop parameters must increase: %g follows %g", pd.S, s.Points[j-1].S)
			}
			pt := sc.NewPoint()
			for c := range pt.Drive {
				pt.Drive[c] = complex(pd.Re[c], pd.Im[c])
			}
			copy(pt.Detuning, pd.Detuning)
			ls.S = append(ls.S, pd.S)
			ls.Points = append(ls.Points, pt)
		}
		l.Segments = append(l.Segments, ls)
	}
	return l, nil
}
