package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/loopgate/loopgate/design"
)

// printOutcome prints a design or verify outcome in words.
func printOutcome(w io.Writer, o *design.Outcome) {
	fmt.Fprintf(w, "%s: %s\n", o.Command, o.Source)
	if o.Title != "" {
		fmt.Fprintf(w, "  %s\n", o.Title)
	}
	fmt.Fprintf(w, "target      %s\nscheme      %s", o.Target, o.Scheme)
	if o.Method != "" {
		fmt.Fprintf(w, " (%s)", o.Method)
	}
	fmt.Fprintln(w)
	if s := o.Search; s != nil {
		fmt.Fprintf(w, "loop        %s, %d parameters, holonomy infidelity %.2e", s.Family, s.Parameters, s.Infidelity)
		if s.HolonomyError > 0 {
			fmt.Fprintf(w, " (±%.1e, %d points)", s.HolonomyError, s.LoopPoints)
		}
		fmt.Fprintf(w, "\n            %d evaluations in %d run(s), seed %d\n", s.Evaluations, s.Restarts, o.Seed)
		for _, f := range s.Findings {
			fmt.Fprintf(w, "            note: %s\n", f)
		}
		if r := s.Robust; r != nil {
			fmt.Fprintf(w, "robust      search model, %d error cases: mean infidelity %.2e nominal → %.2e robust (worst %.2e → %.2e)\n",
				r.Members, r.NominalMean, r.RobustMean, r.NominalWorst, r.RobustWorst)
			fmt.Fprintf(w, "            built waveform over the same cases: mean %.2e, worst %.2e\n", r.BuiltMean, r.BuiltWorst)
			if r.Insensitive {
				fmt.Fprintln(w, "            the holonomy does not depend on these errors; the nominal loop is kept")
			}
		}
	}
	fmt.Fprintf(w, "waveform    %d samples, %s at %s\n", o.Samples, design.FormatSI(o.Duration, "s"), design.FormatSI(o.SampleRate, "S/s"))
	printFigures(w, "ideal", o.Ideal)
	printFigures(w, "with errors", o.WithErrors)
	if o.WithErrors.Fidelity < o.Ideal.Fidelity && len(o.Checks) > 0 && o.Checks[0].IsFidelity() && o.WithErrors.Fidelity < o.Checks[0].Limit {
		fmt.Fprintf(w, "            note: with the error model on, the fidelity is below the goal %g; the checks and the exit code\n"+
			"            refer to the ideal model — see the error budget for what to improve\n", o.Checks[0].Limit)
	}
	if o.Reproduced != nil {
		verdict := "yes, bit for bit"
		if !*o.Reproduced {
			verdict = "NO — the file's figures differ from a fresh simulation"
		}
		fmt.Fprintf(w, "reproduced  %s\n", verdict)
	}
	if a := o.Advantage; a != nil && len(a.Rows) == 0 {
		fmt.Fprintf(w, "\nno geometric-advantage comparison: the dynamical gate is %s\n", a.Dynamical)
	}
	if a := o.Advantage; a != nil && len(a.Rows) > 0 {
		fmt.Fprintf(w, "\nwidth of the region with fidelity ≥ %g along each error axis, geometric vs dynamical gate:\n", a.Threshold)
		for _, r := range a.Rows {
			ratio := "—"
			if r.Ratio != nil {
				ratio = fmt.Sprintf("%s×%.3g", open(r.GeometricOpen && !r.DynamicalOpen), *r.Ratio)
			}
			fmt.Fprintf(w, "  %-30s %13s  vs %13s   %s\n", r.Axis, open(r.GeometricOpen)+width(r.Geometric, r.Unit), open(r.DynamicalOpen)+width(r.Dynamical, r.Unit), ratio)
		}
		fmt.Fprintf(w, "  dynamical gate: %s\n", a.Dynamical)
	}
	if len(o.Budget) > 0 {
		fmt.Fprintln(w, "\nerror budget (infidelity):")
		for _, b := range o.Budget {
			fmt.Fprintf(w, "  %-22s %.2e\n", b.Term, b.Infidelity)
		}
	}
	fmt.Fprintln(w, "\nchecks:")
	for _, c := range o.Checks {
		verdict := "pass"
		if !c.Pass {
			verdict = "FAIL"
		}
		op := "≤"
		if c.Bound == "min" {
			op = "≥"
		}
		fmt.Fprintf(w, "  %-4s %-32s %s %s %s\n", verdict, c.Name, num(c.Value, c.Unit), op, num(c.Limit, c.Unit))
	}
	if len(o.Files) > 0 {
		fmt.Fprintf(w, "\nwrote %s\n", strings.Join(o.Files, ", "))
	}
	fmt.Fprintf(w, "\ncaution: %s\n", design.Caution)
}

func printFigures(w io.Writer, label string, f design.Figures) {
	fmt.Fprintf(w, "%-11s fidelity %.6f, leakage %.2e", label, f.Fidelity, f.Leakage)
	if len(f.PeakExcited) > 0 {
		peak := 0.0
		for _, p := range f.PeakExcited {
			peak = math.Max(peak, p)
		}
		fmt.Fprintf(w, ", peak excited population %.2e", peak)
	}
	if f.Adiabaticity != nil {
		fmt.Fprintf(w, ", adiabaticity %.3g", *f.Adiabaticity)
	}
	fmt.Fprintln(w)
}

// printLoopCheck prints a loop check in words.
func printLoopCheck(w io.Writer, c *design.LoopCheck) {
	fmt.Fprintf(w, "check: %s\nscheme      %s\ntarget      %s\n", c.Source, c.Scheme, c.Target)
	for i, s := range c.Segments {
		fmt.Fprintf(w, "segment %d   %s", i, s.Kind)
		if s.Points > 0 {
			fmt.Fprintf(w, ", holonomy from %d points (error ≤ %.1e), smallest gap %.3g×Ω at s = %.3f, adiabaticity ≈ %.3g/(ΩT)",
				s.Points, s.ErrorEstimate, s.MinGap, s.MinGapAt, s.AdiabaticityProduct)
		}
		if s.Area != 0 {
			fmt.Fprintf(w, ", pulse area %.6g rad", s.Area)
		}
		fmt.Fprintln(w)
		for _, f := range s.Findings {
			fmt.Fprintf(w, "            note: %s\n", f)
		}
	}
	fmt.Fprintln(w, "gate        (computational levels)")
	for _, row := range c.Gate {
		fmt.Fprint(w, "           ")
		for _, v := range row {
			fmt.Fprintf(w, " %+.6f%+.6fi", v[0], v[1])
		}
		fmt.Fprintln(w)
	}
	for _, n := range c.Notes {
		fmt.Fprintf(w, "note        %s\n", n)
	}
	verdict := "pass"
	if !c.Pass {
		verdict = "FAIL"
	}
	fmt.Fprintf(w, "fidelity    %.8f (≥ %g: %s), leakage %.2e\n", c.Fidelity, c.MinFidelity, verdict, c.Leakage)
}

// open marks a width that is only a lower bound.
func open(b bool) string {
	if b {
		return "≥"
	}
	return ""
}

func width(v float64, unit string) string {
	if unit == "" {
		return fmt.Sprintf("%.3g %%", 100*v)
	}
	return design.FormatSI(v, unit)
}

func num(v float64, unit string) string {
	if unit == "" {
		return fmt.Sprintf("%.6g", v)
	}
	return design.FormatSI(v, unit)
}
