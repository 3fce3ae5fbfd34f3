// Package report writes loopgate's visual report: one self-contained HTML
// page per design or verified waveform file.
//
// The page opens with the geometric-advantage comparison (how much wider
// the region of fidelity F ≥ 0.999 is for the geometric gate than for a plain
// dynamical gate along each error axis), then shows the verification
// summary, the control loop on the sphere of normalised drive vectors, the
// waveforms with their hardware limits, the level populations, the
// robustness curves and map, the error budget, the hardware checks, the
// cautions and the provenance.
//
// Figures are drawn with gonum/plot and embedded as inline SVG; the page
// loads nothing from anywhere. Series are told apart by dash pattern and
// marker as well as colour, the map's colour scale darkens steadily, and
// pass or fail is written in words, so the page reads in black-and-white
// print. The package depends on the standard library and gonum/plot only:
// callers fill a Data value with plain numbers and call Write. The same Data
// gives a byte-identical page.
package report
