package batch

import (
	"strings"
	"testing"
	"time"
)

// TestArrayShape: arrays stay within the cluster's size by grouping tasks.
func TestArrayShape(t *testing.T) {
	cases := []struct {
		tasks, per, maxArr int
		wantPer, wantSize  int
	}{
		{8, 0, 0, 1, 8},
		{1000, 0, 0, 1, 1000},
		{1001, 0, 0, 2, 501},
		{10000, 0, 0, 10, 1000},
		{10000, 0, 4000, 3, 3334},
		{10, 4, 0, 4, 3},
	}
	for _, c := range cases {
		s := Slurm{PerElement: c.per, MaxArray: c.maxArr}
		per, size := s.arrayShape(c.tasks)
		if per != c.wantPer || size != c.wantSize || per*size < c.tasks || per*(size-1) >= c.tasks {
			t.Errorf("%d tasks (per %d, max %d): %d per index × %d; want %d × %d", c.tasks, c.per, c.maxArr, per, size, c.wantPer, c.wantSize)
		}
	}
}

// TestRequests: time = per × wall × 3 + 2 min (at least 5 min), memory
// = 2 × peak (at least 256 MiB), rounded up to the minute and 64 MiB.
func TestRequests(t *testing.T) {
	c := &Cost{WallSeconds: 40, PeakBytes: 300 << 20}
	s := Slurm{}
	for _, tc := range []struct {
		per  int
		want time.Duration
	}{{1, 5 * time.Minute}, {10, 22 * time.Minute}, {3, 8 * time.Minute}} {
		if got, _ := s.requests(c, tc.per); got != tc.want {
			t.Errorf("per %d: time %v; want %v", tc.per, got, tc.want)
		}
	}
	if _, mem := s.requests(c, 1); mem != 640<<20 {
		t.Errorf("memory %d MiB; want 640", mem>>20)
	}
	if tm, mem := s.requests(nil, 1); tm != 30*time.Minute || mem != 1<<30 {
		t.Errorf("unmeasured: %v %d", tm, mem)
	}
	s = Slurm{Time: 90 * time.Minute, Memory: 3 << 30}
	if tm, mem := s.requests(c, 1); tm != 90*time.Minute || mem != 3<<30 {
		t.Errorf("given: %v %d", tm, mem)
	}
	if slurmTime(25*time.Hour+61*time.Second) != "1-01:01:01" || slurmMemory(640<<20) != "640M" {
		t.Error("Slurm formats")
	}
}

// TestScript: the lab's settings reach the script, and unsafe ones are
// refused.
func TestScript(t *testing.T) {
	m := &Manifest{Gates: []string{"H", "SX"}, Qubits: []string{"a", "b", "c"}}
	for i := 0; i < 6; i++ {
		m.Tasks = append(m.Tasks, Task{Index: i})
	}
	s := Slurm{Partition: "short", Account: "qlab", Modules: []string{"go/1.26"}, Setup: []string{"export X=1"},
		Options: []string{"--qos=normal"}, Throttle: 4, Command: "/opt/loopgate/bin/loopgate"}
	if err := s.check(); err != nil {
		t.Fatal(err)
	}
	got := s.script(m, "/scratch/my-work", &Cost{Task: "a-H", WallSeconds: 2, PeakBytes: 40 << 20})
	for _, want := range []string{
		"#!/bin/bash -l\n", "#SBATCH --array=0-5%4\n", "#SBATCH --time=00:05:00\n", "#SBATCH --mem=256M\n", "#SBATCH --partition=short\n",
		"#SBATCH --account=qlab\n", "#SBATCH --qos=normal\n", "#SBATCH --chdir=/scratch/my-work\n", "module load go/1.26\nexport X=1\n",
		`exec /opt/loopgate/bin/loopgate batch run . --array-index "$SLURM_ARRAY_TASK_ID" --per-index 1`,
	} {
		if !strings.Contains(got, want) {
			t.Errorf("script lacks %q:\n%s", want, got)
		}
	}
	for _, bad := range []Slurm{{Partition: "a b"}, {Account: "x;rm"}, {Options: []string{"qos=1"}}, {Setup: []string{"a\nb"}}, {Throttle: -1}} {
		if bad.check() == nil {
			t.Errorf("accepted %+v", bad)
		}
	}
}
