package main

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestMain lets the test binary act as the loopgate command when
// LOOPGATE_AS_MAIN is set, so that tests can run it as a process and
// send it signals.
func TestMain(m *testing.M) {
	if os.Getenv("LOOPGATE_AS_MAIN") == "1" {
		os.Args = append([]string{"loopgate"}, os.Args[1:]...)
		main()
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// TestInterrupt starts a full design (search, sweeps, map, report), sends
// it SIGINT while it works, and checks that it exits with code 130 and
// leaves no file in the output folder.
func TestInterrupt(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	// The demo with a 201×201 map: minutes of work, so the signal always
	// arrives mid-run whatever the machine's speed.
	src, err := os.ReadFile(filepath.Join("..", "..", "testdata", "demo-tripod-t.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	big := strings.NewReplacer("amplitude_points: 41", "amplitude_points: 201", "detuning_points: 41", "detuning_points: 201").Replace(string(src))
	if big == string(src) {
		t.Fatal("demo spec has no 41-point map to enlarge")
	}
	spec := filepath.Join(dir, "big.yaml")
	if err := os.WriteFile(spec, []byte(big), 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(os.Args[0], "design", spec, "-o", out, "-q")
	cmd.Env = append(os.Environ(), "LOOPGATE_AS_MAIN=1")
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(700 * time.Millisecond)
	if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
		t.Fatal(err)
	}
	err = cmd.Wait()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 130 {
		t.Fatalf("exit: %v; want code 130", err)
	}
	entries, err := os.ReadDir(out)
	if err != nil && !os.IsNotExist(err) {
		t.Fatal(err)
	}
	for _, e := range entries {
		t.Errorf("interrupted run left %s", e.Name())
	}
}
