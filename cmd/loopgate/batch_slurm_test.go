package main

import (
	"bytes"
	"context"
	"errors"
	"github.com/loopgate/loopgate/design/batch/batchtest"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/loopgate/loopgate/design"
)

var (
	batchBase  = filepath.Join("..", "..", "testdata", "batch", "tweezer-base.yaml")
	batchTable = filepath.Join("..", "..", "testdata", "batch", "tweezer-table.csv")
)

// runBatch runs a command line in-process and returns stdout and the error.
func runBatch(args ...string) (string, error) {
	root := newRoot()
	var out bytes.Buffer
	root.SetOut(&out)
	root.SetErr(&out)
	root.SetArgs(args)
	err := root.ExecuteContext(context.Background())
	return out.String(), err
}

// needSlurm skips the test when Slurm is missing, except under CI=true,
// where it fails: CI starts a cluster (.ci/slurm-cluster.sh).
func needSlurm(t *testing.T) {
	t.Helper()
	_, err := exec.LookPath("sbatch")
	if err == nil {
		err = exec.Command("sinfo", "-h").Run()
	}
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("Slurm is not usable here (%v); CI must run .ci/slurm-cluster.sh start first", err)
		}
		t.Skipf("Slurm is not usable here (%v); .ci/slurm-cluster.sh start sets up a one-node cluster", err)
	}
}

// slurm runs a Slurm command whose array tasks run this test binary as
// the loopgate command.
func slurm(t *testing.T, name string, args ...string) string {
	t.Helper()
	cmd := exec.Command(name, args...)
	cmd.Env = append(os.Environ(), "LOOPGATE_AS_MAIN=1")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("%s %s: %v\n%s", name, strings.Join(args, " "), err, out)
	}
	return strings.TrimSpace(string(out))
}

var files = batchtest.ReadTree

// TestSlurmArray submits the demo table (4 sites × 2 gates) as a real
// Slurm array and checks that the collected outputs equal a local run's
// byte for byte; that a task cancelled with scancel mid-run is finished
// by a rerun; and that a bad row is refused at plan time.
func TestSlurmArray(t *testing.T) {
	if testing.Short() {
		t.Skip("runs designs; skipped with -short")
	}
	needSlurm(t)
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	arr, local := filepath.Join(dir, "array"), filepath.Join(dir, "local")
	for _, w := range []string{arr, local} {
		if out, err := runBatch("batch", "plan", batchBase, batchTable, "--gates", "H,SX", "-o", w, "--no-probe",
			"--throttle", "4", "--time", "10m", "--mem", "512M", "--command", exe, "-q"); err != nil {
			t.Fatalf("plan: %v\n%s", err, out)
		}
	}
	script, err := os.ReadFile(filepath.Join(arr, "array.sbatch"))
	if err != nil || !strings.Contains(string(script), "#SBATCH --array=0-7%4\n") {
		t.Fatalf("batch script: %v\n%s", err, script)
	}
	slurm(t, "sbatch", "--wait", "--parsable", filepath.Join(arr, "array.sbatch"))
	if logs, _ := filepath.Glob(filepath.Join(arr, "logs", "*.out")); len(logs) != 8 {
		t.Errorf("%d array task logs; want 8", len(logs))
	}
	if out, err := runBatch("batch", "run", local, "-j", "2", "-q"); err != nil {
		t.Fatalf("local run: %v\n%s", err, out)
	}
	for _, w := range []string{arr, local} {
		if out, err := runBatch("batch", "collect", w); err != nil {
			t.Fatalf("collect %s: %v\n%s", w, err, out)
		}
	}
	want, got := files(t, local, "tasks", "summary.csv", "summary.json", "index.html"), files(t, arr, "tasks", "summary.csv", "summary.json", "index.html")
	if len(want) != 8*6+3 || len(got) != len(want) {
		t.Errorf("%d files from the array, %d from the local run; want %d", len(got), len(want), 8*6+3)
	}
	for name, b := range want {
		if !bytes.Equal(b, got[name]) {
			t.Errorf("%s differs between the array and the local run", name)
		}
	}

	t.Run("scancel", func(t *testing.T) { slurmCancelRerun(t, exe) })

	// A bad row: refused at plan time, with row, column and spec field
	// named, and no work folder or script written.
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("site,hardware.max_rabi\nt0,16 MHz\nt1,16.5 us\n"), 0o644)
	work := filepath.Join(dir, "bad-work")
	_, err = runBatch("batch", "plan", batchBase, bad, "--gates", "H,SX", "-o", work, "-q")
	if design.ExitStatus(err) != design.ExitBadInput || err == nil ||
		!strings.Contains(err.Error(), `bad.csv row 3, column hardware.max_rabi = "16.5 us": spec field hardware.max_rabi:`) {
		t.Errorf("bad row: exit %d, %v", design.ExitStatus(err), err)
	}
	if _, serr := os.Stat(work); !errors.Is(serr, fs.ErrNotExist) {
		t.Errorf("a refused plan wrote %s", work)
	}
}

// slurmCancelRerun submits one slow task (a 61×61 robustness map), cancels
// it with scancel once it is designing, checks that it left no output, and
// submits the script again, which finishes it.
func slurmCancelRerun(t *testing.T, exe string) {
	dir := t.TempDir()
	src, err := os.ReadFile(batchBase)
	if err != nil {
		t.Fatal(err)
	}
	big := strings.Replace(string(src), "map: {amplitude_points: 11, detuning_points: 11}", "map: {amplitude_points: 61, detuning_points: 61}", 1)
	base, tab, work := filepath.Join(dir, "slow.yaml"), filepath.Join(dir, "one.csv"), filepath.Join(dir, "work")
	os.WriteFile(base, []byte(big), 0o644)
	os.WriteFile(tab, []byte("site,errors.amplitude\nt0,0.01\n"), 0o644)
	if out, err := runBatch("batch", "plan", base, tab, "--gates", "H", "-o", work, "--no-probe", "--time", "10m", "--mem", "512M", "--command", exe, "-q"); err != nil {
		t.Fatalf("plan: %v\n%s", err, out)
	}
	job := slurm(t, "sbatch", "--parsable", filepath.Join(work, "array.sbatch"))
	scratch := filepath.Join(work, "scratch", "t0-H", "out")
	deadline := time.Now().Add(60 * time.Second)
	for {
		if _, err := os.Stat(scratch); err == nil {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("job %s did not start the task within 60 s", job)
		}
		time.Sleep(100 * time.Millisecond)
	}
	time.Sleep(300 * time.Millisecond)
	slurm(t, "scancel", job)
	for deadline = time.Now().Add(60 * time.Second); ; time.Sleep(200 * time.Millisecond) {
		// An ended job leaves the queue; once purged, squeue calls its id
		// invalid.
		out, err := exec.Command("squeue", "-h", "-j", job).CombinedOutput()
		if strings.TrimSpace(string(out)) == "" || (err != nil && strings.Contains(string(out), "Invalid job id")) {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("job %s still queued 60 s after scancel", job)
		}
	}
	if _, err := os.Stat(filepath.Join(work, "tasks", "t0-H")); !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("the cancelled task left tasks/t0-H (%v)", err)
	}
	if _, err := os.Stat(scratch); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("the cancelled task left its scratch output (%v)", err)
	}
	// Slurm's log of the cancelled array task says it was cancelled
	// while running (not before it started, not after it ended).
	if log, err := os.ReadFile(filepath.Join(work, "logs", job+"_0.out")); err != nil || !bytes.Contains(log, []byte("CANCELLED")) {
		t.Errorf("log of the cancelled task: %v\n%s", err, log)
	}
	if left, _ := os.ReadDir(filepath.Join(work, "failures")); len(left) > 0 {
		t.Errorf("the cancelled task was recorded as failed: %s", left[0].Name())
	}
	slurm(t, "sbatch", "--wait", "--parsable", filepath.Join(work, "array.sbatch"))
	if _, err := os.Stat(filepath.Join(work, "tasks", "t0-H", "task.json")); err != nil {
		t.Fatalf("the rerun did not finish the task: %v", err)
	}
	if out, err := runBatch("batch", "collect", work); err != nil || !strings.Contains(out, "1 passed") {
		t.Errorf("collect after the rerun: %v\n%s", err, out)
	}
}
