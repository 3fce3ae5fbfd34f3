package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/design"
)

// TestBatchCommands drives plan, run and collect through the command
// line on the demo table, without Slurm.
func TestBatchCommands(t *testing.T) {
	dir := t.TempDir()
	work := filepath.Join(dir, "work")
	out, err := runBatch("batch", "plan", batchBase, batchTable, "--gates", "H, SX", "-o", work, "--no-probe", "--json",
		"--partition", "short", "--module", "loopgate/0.1", "--throttle", "3")
	var plan struct {
		Tasks  int      `json:"tasks"`
		Gates  []string `json:"gates"`
		Script string   `json:"script"`
	}
	if err != nil || json.Unmarshal([]byte(out), &plan) != nil || plan.Tasks != 8 || len(plan.Gates) != 2 {
		t.Fatalf("plan: %v\n%s", err, out)
	}
	script, _ := os.ReadFile(plan.Script)
	for _, want := range []string{"#SBATCH --array=0-7%3", "#SBATCH --partition=short", "module load loopgate/0.1"} {
		if !strings.Contains(string(script), want) {
			t.Errorf("script lacks %q", want)
		}
	}
	out, err = runBatch("batch", "run", work, "--task", "t2-SX", "--json")
	if err != nil || !strings.Contains(out, `"id": "t2-SX"`) || !strings.Contains(out, `"state": "done"`) {
		t.Errorf("run one task: %v\n%s", err, out)
	}
	out, err = runBatch("batch", "collect", work)
	if design.ExitStatus(err) != design.ExitChecks || !strings.Contains(out, "1 passed") || !strings.Contains(out, "7 not run") {
		t.Errorf("collect with 7 tasks not run: exit %d, %v\n%s", design.ExitStatus(err), err, out)
	}
	for _, c := range []struct {
		args []string
		code int
	}{
		{[]string{"batch", "run", work, "--task", "nope"}, design.ExitBadInput},
		{[]string{"batch", "run", filepath.Join(dir, "none")}, design.ExitBadInput},
		{[]string{"batch", "plan", batchBase, batchTable, "--gates", "H", "-o", work, "--no-probe"}, design.ExitOutput},
		{[]string{"batch", "plan", batchBase, batchTable, "--gates", "H", "-o", filepath.Join(dir, "w2"), "--mem", "lots"}, design.ExitBadInput},
		{[]string{"batch", "plan", batchBase, batchTable, "-o", filepath.Join(dir, "w3")}, design.ExitBadInput},
	} {
		if _, err := runBatch(c.args...); design.ExitStatus(err) != c.code {
			t.Errorf("%v: exit %d (%v); want %d", c.args, design.ExitStatus(err), err, c.code)
		}
	}
}
