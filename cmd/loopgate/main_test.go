package main

import (
	"bytes"
	"context"
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/design"
)

// run executes the command line in-process and returns stdout and the
// exit code the binary would return.
func run(t *testing.T, args ...string) (string, int) {
	t.Helper()
	root := newRoot()
	var out bytes.Buffer
	root.SetOut(&out)
	root.SetErr(&out)
	root.SetArgs(args)
	err := root.ExecuteContext(context.Background())
	return out.String(), exitCode(err)
}

func TestCommands(t *testing.T) {
	dir := t.TempDir()
	lambda := filepath.Join("..", "..", "testdata", "demo-lambda-hadamard.yaml")
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"gates", []string{"gates"}, 0, "Hadamard"},
		{"schema", []string{"schema", "waveform"}, 0, `"$schema"`},
		{"unknown schema", []string{"schema", "nope"}, exitBadInput, ""},
		{"starter", []string{"starter", "tripod"}, 0, "preset: tripod"},
		{"unknown flag", []string{"design", "--no-such-flag"}, exitBadInput, ""},
		{"bad spec", []string{"design", filepath.Join("..", "..", "testdata", "bad", "nan.yaml"), "-o", t.TempDir()}, exitBadInput, ""},
		{"missing spec", []string{"design", "no-such-file.yaml", "-o", t.TempDir()}, exitBadInput, ""},
		{"design", []string{"design", lambda, "-o", dir, "--no-sweeps", "--no-report", "-q"}, 0, "fidelity"},
		{"design again", []string{"design", lambda, "-o", dir, "--no-sweeps", "--no-report", "-q"}, exitOutput, ""},
		{"verify", []string{"verify", filepath.Join(dir, "waveform.json"), "--no-sweeps", "--json"}, 0, `"reproduced": true`},
		{"verify bad flag value", []string{"verify", filepath.Join(dir, "waveform.json"), "--amplitude-error", "2 MHz"}, exitBadInput, ""},
		{"verify directory", []string{"verify", dir}, exitBadInput, ""},
		{"verify filter", []string{"verify", filepath.Join(dir, "waveform.json"), "--no-sweeps", "--rise-time", "5 ns", "--filter", "first-order", "--phase-step", "pi/256"}, 0, "phase resolution"},
		{"verify bad filter", []string{"verify", filepath.Join(dir, "waveform.json"), "--filter", "boxcar"}, exitBadInput, ""},
		{"check", []string{"check", filepath.Join(dir, "loop.json")}, 0, "pass"},
		{"check other target", []string{"check", filepath.Join(dir, "loop.json"), "--target", "Z"}, exitChecks, "FAIL"},
	}
	for _, c := range cases {
		out, code := run(t, c.args...)
		if code != c.code {
			t.Errorf("%s: exit code %d, want %d\n%s", c.name, code, c.code, out)
			continue
		}
		if c.want != "" && !strings.Contains(out, c.want) {
			t.Errorf("%s: output lacks %q:\n%s", c.name, c.want, out)
		}
	}
}

func TestDesignJSON(t *testing.T) {
	dir := t.TempDir()
	out, code := run(t, "design", filepath.Join("..", "..", "testdata", "demo-lambda-t.yaml"), "-o", dir, "--no-sweeps", "--no-report", "--json")
	if code != 0 {
		t.Fatalf("exit %d\n%s", code, out)
	}
	var o design.Outcome
	if err := json.Unmarshal([]byte(out), &o); err != nil {
		t.Fatalf("--json output is not JSON: %v\n%s", err, out)
	}
	if o.Ideal.Fidelity < 0.9999 || !o.Pass || len(o.Files) != 4 {
		t.Errorf("outcome %+v", o)
	}
}

// TestOverwriteHint checks that a refused existing output names the flag
// that allows replacing it.
func TestOverwriteHint(t *testing.T) {
	path := filepath.Join(t.TempDir(), "s.yaml")
	if _, code := run(t, "starter", "lambda", "-o", path); code != 0 {
		t.Fatalf("first write: exit %d", code)
	}
	root := newRoot()
	root.SetOut(new(bytes.Buffer))
	root.SetErr(new(bytes.Buffer))
	root.SetArgs([]string{"starter", "lambda", "-o", path})
	err := root.ExecuteContext(context.Background())
	if exitCode(err) != exitOutput || !strings.Contains(err.Error(), overwriteFlag) {
		t.Errorf("second write: %v (exit %d); want exit %d naming %s", err, exitCode(err), exitOutput, overwriteFlag)
	}
}
