// Package batchtest holds test helpers shared by the batch runner's tests
// and the command's Slurm test: reading a work folder's files to compare
// two runs byte for byte.
package batchtest

import (
	"io/fs"
	"os"
	"path/filepath"
	"testing"
)

// ReadTree reads every file under dir/sub (or the file dir/sub), for each
// sub, into a map keyed by the path relative to dir.
func ReadTree(t testing.TB, dir string, subs ...string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	for _, sub := range subs {
		err := filepath.WalkDir(filepath.Join(dir, sub), func(p string, d fs.DirEntry, err error) error {
			if err != nil || d.IsDir() {
				return err
			}
			b, err := os.ReadFile(p)
			rel, _ := filepath.Rel(dir, p)
			out[rel] = b
			return err
		})
		if err != nil {
			t.Fatal(err)
		}
	}
	return out
}
