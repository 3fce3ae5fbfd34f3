package atomicfile

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
)

// leftovers lists the temporary files in dir.
func leftovers(t *testing.T, dir string) []string {
	t.Helper()
	m, err := filepath.Glob(filepath.Join(dir, tempPrefix+"*"))
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func readString(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestWriteFileNew(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "gate.json")
	if err := WriteFile(p, []byte("hello"), false); err != nil {
		t.Fatal(err)
	}
	if got := readString(t, p); got != "hello" {
		t.Errorf("content %q", got)
	}
	st, _ := os.Stat(p)
	if st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", st.Mode().Perm())
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("temporary files left: %v", l)
	}
}

func TestNoOverwriteWithoutFlag(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "gate.json")
	os.WriteFile(p, []byte("old"), 0o644)
	err := WriteFile(p, []byte("new"), false)
	if err == nil || !errors.Is(err, fs.ErrExist) || !strings.Contains(err.Error(), "already exists and may not be replaced") {
		t.Fatalf("err = %v", err)
	}
	if got := readString(t, p); got != "old" {
		t.Errorf("existing file changed to %q", got)
	}
	if err := CheckPaths([]string{filepath.Join(dir, "other.csv"), p}, false); err == nil || !errors.Is(err, fs.ErrExist) {
		t.Errorf("CheckPaths: %v", err)
	}
	if err := CheckPaths([]string{p}, true); err != nil {
		t.Errorf("CheckPaths with overwrite: %v", err)
	}
	// With the flag the file is replaced.
	if err := WriteFile(p, []byte("new"), true); err != nil {
		t.Fatal(err)
	}
	if got := readString(t, p); got != "new" {
		t.Errorf("content %q after overwrite", got)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("temporary files left: %v", l)
	}
}

// A file that appears while the output is being written is not replaced.
func TestNoOverwriteRace(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "gate.json")
	a, err := Create(p, false)
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(a, "mine")
	os.WriteFile(p, []byte("theirs"), 0o644)
	if err := a.Commit(); err == nil || !errors.Is(err, fs.ErrExist) {
		t.Fatalf("Commit over a new file: %v", err)
	}
	if got := readString(t, p); got != "theirs" {
		t.Errorf("file replaced: %q", got)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("temporary files left: %v", l)
	}
}

// A failing writer leaves no output and no temporary file, and keeps an
// existing file's content even with overwrite.
func TestWriteAtomicFailure(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "samples.csv")
	boom := errors.New("disk on fire")
	write := func(w io.Writer) error {
		fmt.Fprintln(w, strings.Repeat("half a row,", 1<<14)) // more than the buffer
		return boom
	}
	err := WriteWith(p, false, write)
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), p) {
		t.Fatalf("err = %v", err)
	}
	if _, err := os.Stat(p); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("output exists after failure: %v", err)
	}
	os.WriteFile(p, []byte("old"), 0o644)
	if err := WriteWith(p, true, write); !errors.Is(err, boom) {
		t.Fatalf("err = %v", err)
	}
	if got := readString(t, p); got != "old" {
		t.Errorf("old content lost: %q", got)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("temporary files left: %v", l)
	}
}

func TestAbort(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "x.npy")
	a, err := Create(p, false)
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(a, "partial")
	if err := a.Abort(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(p); !errors.Is(err, fs.ErrNotExist) {
		t.Error("output exists after Abort")
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("temporary files left: %v", l)
	}
	if _, err := a.Write([]byte("x")); err == nil {
		t.Error("Write after Abort succeeded")
	}
	if err := a.Commit(); err == nil {
		t.Error("Commit after Abort succeeded")
	}
	b, _ := Create(p, false)
	io.WriteString(b, "done")
	if err := b.Commit(); err != nil {
		t.Fatal(err)
	}
	if err := b.Abort(); err != nil || readString(t, p) != "done" {
		t.Errorf("Abort after Commit: %v", err)
	}
}

func TestOutputPathErrors(t *testing.T) {
	dir := t.TempDir()
	sub := filepath.Join(dir, "sub")
	os.Mkdir(sub, 0o755)
	file := filepath.Join(dir, "file")
	os.WriteFile(file, []byte("x"), 0o644)
	cases := []struct {
		path string
		frag string
	}{
		{sub, "is a directory; expected a file path"},
		{filepath.Join(dir, "missing", "gate.json"), "folder " + filepath.Join(dir, "missing")},
		{filepath.Join(file, "gate.json"), "not a directory"},
		{"", "expected a file path"},
	}
	for _, c := range cases {
		for _, ow := range []bool{false, true} {
			_, err := Create(c.path, ow)
			if err == nil || !strings.Contains(err.Error(), c.frag) {
				t.Errorf("Create(%q, %v): %v; want %q", c.path, ow, err, c.frag)
			}
		}
	}
	if err := PrepareDir(file); err == nil || !strings.Contains(err.Error(), "is a file, not a folder") {
		t.Errorf("PrepareDir(file): %v", err)
	}
}

func TestPrepareDir(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "a", "b")
	if err := PrepareDir(dir); err != nil {
		t.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 0 {
		t.Errorf("probe left files: %v", entries)
	}
}

// A folder that cannot be written gets a clear error. Permission bits do
// not stop root, so the check uses /proc, which nobody can write.
func TestUnwritableFolder(t *testing.T) {
	if os.Geteuid() != 0 {
		dir := t.TempDir()
		ro := filepath.Join(dir, "ro")
		os.Mkdir(ro, 0o555)
		defer os.Chmod(ro, 0o755)
		if err := PrepareDir(ro); err == nil || !strings.Contains(err.Error(), "cannot write in it") {
			t.Errorf("PrepareDir(read-only): %v", err)
		}
		if _, err := Create(filepath.Join(ro, "g.json"), false); err == nil || !strings.Contains(err.Error(), "cannot write in folder") {
			t.Errorf("Create(read-only): %v", err)
		}
	}
	if runtime.GOOS != "linux" {
		return
	}
	if err := PrepareDir("/proc/loopgate-out"); err == nil || !strings.Contains(err.Error(), "output folder /proc/loopgate-out: cannot") {
		t.Errorf("PrepareDir(/proc/...): %v", err)
	}
	if _, err := Create("/proc/loopgate.json", false); err == nil || !strings.Contains(err.Error(), "cannot write in folder /proc") {
		t.Errorf("Create(/proc/...): %v", err)
	}
}

// A writer killed (SIGKILL) in the middle of a file leaves nothing at the
// output path; CleanTemps then removes its temporary file.
func TestKilledWriterLeavesNoOutput(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("needs SIGKILL")
	}
	if path := os.Getenv("LOOPGATE_ATOMIC_HELPER"); path != "" {
		a, err := Create(path, false)
		if err != nil {
			os.Exit(3)
		}
		a.Write([]byte(strings.Repeat("x", 4096)))
		a.f.Sync()
		time.Sleep(time.Minute) // killed here
		os.Exit(4)
	}
	dir := t.TempDir()
	out := filepath.Join(dir, "waveform.json")
	cmd := exec.Command(os.Args[0], "-test.run=^TestKilledWriterLeavesNoOutput$")
	cmd.Env = append(os.Environ(), "LOOPGATE_ATOMIC_HELPER="+out)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(20 * time.Second)
	for {
		l := leftovers(t, dir)
		if len(l) == 1 {
			if st, err := os.Stat(l[0]); err == nil && st.Size() == 4096 {
				break
			}
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatal("helper did not start writing")
		}
		time.Sleep(10 * time.Millisecond)
	}
	cmd.Process.Kill()
	cmd.Wait()
	if _, err := os.Stat(out); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("output exists after kill: %v", err)
	}
	n, err := CleanTemps(dir)
	if err != nil || n != 1 || len(leftovers(t, dir)) != 0 {
		t.Errorf("CleanTemps removed %d (%v); left %v", n, err, leftovers(t, dir))
	}
}
