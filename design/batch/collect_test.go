package batch

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestCollectSummary runs the demo (4 sites × H) and checks the summary
// against the task files and against physics.
func TestCollectSummary(t *testing.T) {
	if testing.Short() {
		t.Skip("runs designs; skipped with -short")
	}
	work := planDemo(t, "H")
	if _, err := Run(context.Background(), RunOptions{Work: work, Jobs: 2, ArrayIndex: -1}); err != nil {
		t.Fatal(err)
	}
	s, err := Collect(work)
	if err != nil {
		t.Fatal(err)
	}
	if s.Counts != (Counts{Tasks: 4, Passed: 4}) {
		t.Fatalf("counts %+v", s.Counts)
	}
	maxRabi := map[string]float64{"t0": 16.2e6, "t1": 18.9e6, "t2": 19.4e6, "t3": 17.1e6} // the table
	var tOmega []float64
	for _, r := range s.Tasks {
		// The figures are those of the waveform file, read independently.
		var wf struct {
			Verification struct {
				Fidelity float64 `json:"fidelity"`
			} `json:"verification"`
			Waveform struct {
				SampleRate float64 `json:"sample_rate"`
			} `json:"waveform"`
		}
		data, err := os.ReadFile(filepath.Join(work, tasksDir, r.ID, "waveform.json"))
		if err != nil || json.Unmarshal(data, &wf) != nil {
			t.Fatalf("%s: waveform.json: %v", r.ID, err)
		}
		if *r.IdealFidelity != wf.Verification.Fidelity {
			t.Errorf("%s: summary ideal fidelity %v, waveform file %v", r.ID, *r.IdealFidelity, wf.Verification.Fidelity)
		}
		if *r.ErrorModelInfidelity != 1-*r.ErrorModelFidelity || *r.ErrorModelFidelity >= *r.IdealFidelity {
			t.Errorf("%s: error-model F %v vs ideal %v", r.ID, *r.ErrorModelFidelity, *r.IdealFidelity)
		}
		// The per-site Rabi limit is the one checked.
		found := false
		for _, c := range r.Checks {
			if strings.HasPrefix(c.Name, "peak Rabi frequency") {
				found = true
				if *c.Limit != maxRabi[r.Qubit] || *c.Value > *c.Limit {
					t.Errorf("%s: %s %v, limit %v; table says %v", r.ID, c.Name, *c.Value, *c.Limit, maxRabi[r.Qubit])
				}
			}
		}
		if !found || r.Report != "tasks/"+r.ID+"/report.html" {
			t.Errorf("%s: no Rabi check, or report %q", r.ID, r.Report)
		}
		tOmega = append(tOmega, *r.Duration*maxRabi[r.Qubit])
	}
	// Adiabatic scaling: for H(t) = Ω·h(t/T) the adiabaticity measure
	// max |⟨m|∂ₜH|n⟩|/(Eₘ−Eₙ)² equals (1/ΩT)·max |⟨m|h′|n⟩|/(eₘ−eₙ)² (each
	// ∂ₜ brings 1/T, H and the gaps scale with Ω; the adiabatic condition
	// as in Messiah, Quantum Mechanics II, ch. XVII). Every site has the
	// same loop shape and the same adiabaticity goal, and its strongest
	// channel is at its own Rabi limit, so T·Ω_max is the same at every
	// site, up to the padding of the sample count to the granularity (16
	// samples at 1 GS/s = 16 ns, under 1 % of T here).
	for i, x := range tOmega {
		if d := math.Abs(x-tOmega[0]) / tOmega[0]; d > 0.01 {
			t.Errorf("T·Ω_max of %s is %.4g, of %s %.4g: differ by %.2g", s.Tasks[i].ID, x, s.Tasks[0].ID, tOmega[0], d)
		}
	}

	checkSummaryCSV(t, work, s)
	page, err := os.ReadFile(filepath.Join(work, IndexFile))
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range s.Tasks {
		if !strings.Contains(string(page), `href="`+r.Report+`"`) {
			t.Errorf("index.html does not link %s", r.Report)
		}
	}
	if n := strings.Count(string(page), "<rect "); n < 4 {
		t.Errorf("index.html figure has %d squares", n)
	}
}

// checkSummaryCSV checks that summary.csv holds the summary's figures,
// exactly (shortest round-trip formatting).
func checkSummaryCSV(t *testing.T, work string, s *Summary) {
	t.Helper()
	f, err := os.Open(filepath.Join(work, SummaryCSV))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil || len(recs) != 5 || strings.Join(recs[0], ",") != strings.Join(csvHeader, ",") {
		t.Fatalf("summary.csv: %v %v", recs, err)
	}
	for i, rec := range recs[1:] {
		r := s.Tasks[i]
		fid, _ := strconv.ParseFloat(rec[6], 64)
		if rec[0] != r.Qubit || rec[1] != r.Gate || rec[3] != StatusPassed || fid != *r.ErrorModelFidelity || !strings.Contains(rec[11], "peak Rabi frequency pa") {
			t.Errorf("csv row %d: %v", i+1, rec)
		}
	}
}

// TestCollectNotRun: a planned folder with nothing run lists every task as
// not run, writes the summary, and reports it.
func TestCollectNotRun(t *testing.T) {
	work := planDemo(t, "H", "T")
	s, err := Collect(work)
	if err == nil || exitCode(err) != 3 || s.Counts != (Counts{Tasks: 8, NotRun: 8}) {
		t.Fatalf("collect: %+v %v", s, err)
	}
	page, _ := os.ReadFile(filepath.Join(work, IndexFile))
	if strings.Count(string(page), ">×</text>") != 8 {
		t.Errorf("index.html does not mark the 8 missing results")
	}
}
