package atomicfile_test

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/loopgate/loopgate/design/internal/atomicfile"
)

func ExampleWriteFile() {
	dir, _ := os.MkdirTemp("", "loopgate-example")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "gate.json")

	fmt.Println(atomicfile.WriteFile(path, []byte(`{"ok": true}`), false))
	// A second write without overwrite is refused.
	err := atomicfile.WriteFile(path, []byte(`{}`), false)
	fmt.Println(err != nil, filepath.Base(path), "kept:", readFile(path))
	fmt.Println(atomicfile.WriteFile(path, []byte(`{}`), true), "now:", readFile(path))
	// Output:
	// <nil>
	// true gate.json kept: {"ok": true}
	// <nil> now: {}
}

func readFile(p string) string {
	b, _ := os.ReadFile(p)
	return string(b)
}
