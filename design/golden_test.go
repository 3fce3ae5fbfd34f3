package design

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"flag"
	"fmt"
	"github.com/loopgate/loopgate/design/spec"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

var updateGolden = flag.Bool("golden.update", false, "rewrite testdata/golden/sha256.txt from this tree")

// goldenHashes is the file of SHA-256 hashes of every file the design
// pipeline writes for each demo spec with seed 7, and of the report that
// VerifyFile writes for the first demo's waveform. It was recorded before
// the packages were split by stage; a refactoring must not change a byte.
var goldenHashes = filepath.Join("..", "testdata", "golden", "sha256.txt")

const goldenSeed uint64 = 7

// TestGoldenOutputs runs the full pipeline (search, sampling, verification,
// sweeps, map, comparison, report) on every demo spec in testdata and on the
// built-in demo, and compares the hash of every output file with the hashes
// committed in testdata/golden. Run with -golden.update to record new ones
// after a change that is meant to change the output.
func TestGoldenOutputs(t *testing.T) {
	if testing.Short() {
		t.Skip("full design of every demo")
	}
	got := goldenRun(t)
	if *updateGolden {
		var b strings.Builder
		keys := make([]string, 0, len(got))
		for k := range got {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			fmt.Fprintf(&b, "%s  %s\n", got[k], k)
		}
		if err := os.WriteFile(goldenHashes, []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want := readGolden(t)
	for k, w := range want {
		t.Run(k, func(t *testing.T) {
			g, ok := got[k]
			switch {
			case !ok:
				t.Errorf("not written")
			case g != w:
				t.Errorf("sha256 %s; recorded %s", g, w)
			}
		})
	}
	for k := range got {
		if _, ok := want[k]; !ok {
			t.Errorf("%s written but has no recorded hash", k)
		}
	}
}

// goldenRun designs every demo into a temporary folder and returns the
// hash of each file keyed by "demo/file".
func goldenRun(t *testing.T) map[string]string {
	t.Helper()
	demos, err := filepath.Glob(filepath.Join("..", "testdata", "demo-*.yaml"))
	if err != nil || len(demos) == 0 {
		t.Fatalf("no demo specs: %v", err)
	}
	root := t.TempDir()
	seed := goldenSeed
	run := func(name string, spc *spec.Spec) {
		dir := filepath.Join(root, name)
		if _, err := Design(context.Background(), spc, Options{OutDir: dir, Seed: &seed}); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
	}
	for _, p := range demos {
		spc, err := spec.LoadSpec(p)
		if err != nil {
			t.Fatal(err)
		}
		run(strings.TrimSuffix(filepath.Base(p), ".yaml"), spc)
	}
	spc, err := spec.LoadDemoSpec()
	if err != nil {
		t.Fatal(err)
	}
	run("builtin", spc)

	first := strings.TrimSuffix(filepath.Base(demos[0]), ".yaml")
	vdir := filepath.Join(root, "verify-"+first)
	if err := os.Mkdir(vdir, 0o755); err != nil {
		t.Fatal(err)
	}
	if _, err := VerifyFile(context.Background(), filepath.Join(root, first, WaveformFile), VerifyOptions{Report: filepath.Join(vdir, ReportFile)}); err != nil {
		t.Fatalf("verify %s: %v", first, err)
	}

	got := map[string]string{}
	dirs, err := os.ReadDir(root)
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range dirs {
		files, err := os.ReadDir(filepath.Join(root, d.Name()))
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range files {
			data, err := os.ReadFile(filepath.Join(root, d.Name(), f.Name()))
			if err != nil {
				t.Fatal(err)
			}
			sum := sha256.Sum256(data)
			got[d.Name()+"/"+f.Name()] = hex.EncodeToString(sum[:])
		}
	}
	return got
}

func readGolden(t *testing.T) map[string]string {
	t.Helper()
	data, err := os.ReadFile(goldenHashes)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{}
	for i, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		f := strings.Fields(line)
		if len(f) != 2 || len(f[0]) != 64 {
			t.Fatalf("%s:%d: want \"<sha256>  <demo>/<file>\"", goldenHashes, i+1)
		}
		want[f[1]] = f[0]
	}
	return want
}
