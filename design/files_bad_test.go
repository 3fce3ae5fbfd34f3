package design

import (
	"context"
	"path/filepath"
	"strings"
	"testing"
)

// TestBadFiles reads every bad waveform and loop file in testdata/bad
// through the commands' entry points and checks the message names the
// file and the place (JSON pointer) and says what is wrong, with the
// bad-input exit code.
func TestBadFiles(t *testing.T) {
	cases := []struct {
		file string
		want []string
	}{
		{"waveform-empty.json", []string{"empty file", "loopgate-waveform"}},
		{"waveform-malformed.json", []string{"not valid JSON at line 94"}},
		{"waveform-is-loop-file.json", []string{"/format", `"loopgate-loop"; expected "loopgate-waveform"`}},
		{"waveform-unknown-version.json", []string{"/version", "format version 9 is not supported"}},
		{"waveform-unknown-key.json", []string{"/operator", "Additional property operator is not allowed"}},
		{"waveform-short-channel.json", []string{"/channels/0/i_hz", "94 samples where the file declares 96"}},
		{"waveform-edited-sample.json", []string{"/channels/0/i_code/10", "does not match the sample"}},
		{"loop-empty.json", []string{"empty file", "loopgate-loop"}},
		{"loop-is-waveform-file.json", []string{"/format", `expected "loopgate-loop"`}},
		{"loop-unknown-version.json", []string{"/version", "format version 3 is not supported"}},
		{"loop-unknown-level.json", []string{"/scheme/channels/0/upper", `level "x" is not in the scheme`}},
		{"is-a-directory.yaml", []string{"is a directory; expected a file"}},
		{"no-such-file.json", []string{"no such file"}},
	}
	for _, c := range cases {
		path := filepath.Join("..", "testdata", "bad", c.file)
		var err error
		if strings.HasPrefix(c.file, "loop-") {
			_, err = CheckLoopFile(context.Background(), path, CheckOptions{})
		} else {
			_, err = VerifyFile(context.Background(), path, VerifyOptions{NoSweeps: true})
		}
		if err == nil {
			t.Errorf("%s: no error", c.file)
			continue
		}
		msg := err.Error()
		if ExitCode(err) != ExitBadInput || !strings.Contains(msg, path) {
			t.Errorf("%s: exit %d, message %q; want exit %d and the file named", c.file, ExitCode(err), msg, ExitBadInput)
		}
		for _, w := range c.want {
			if !strings.Contains(msg, w) {
				t.Errorf("%s: message %q lacks %q", c.file, msg, w)
			}
		}
	}
}

// TestUnwritableOutput asks for an output folder that cannot be created.
func TestUnwritableOutput(t *testing.T) {
	spc := loadDemo(t, "demo-lambda-hadamard.yaml")
	_, err := Design(context.Background(), spc, Options{OutDir: "/proc/loopgate-cannot-write-here", NoSweeps: true})
	if err == nil || ExitCode(err) != ExitOutput || !strings.Contains(err.Error(), "/proc/loopgate-cannot-write-here") {
		t.Fatalf("got %v (exit %d); want an output error naming the folder", err, ExitCode(err))
	}
	t.Log(err)
}
