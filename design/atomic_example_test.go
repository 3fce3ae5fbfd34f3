package design_test

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/loopgate/loopgate/design"
)

func ExampleWriteFileAtomic() {
	dir, _ := os.MkdirTemp("", "loopgate-example")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "gate.json")

	fmt.Println(design.WriteFileAtomic(path, []byte(`{"ok": true}`), false))
	// A second write without overwrite is refused and names the flag.
	err := design.WriteFileAtomic(path, []byte(`{}`), false)
	fmt.Println(err != nil, filepath.Base(path), "kept:", readFile(path))
	fmt.Println(design.WriteFileAtomic(path, []byte(`{}`), true), "now:", readFile(path))
	// Output:
	// <nil>
	// true gate.json kept: {"ok": true}
	// <nil> now: {}
}

func readFile(p string) string {
	b, _ := os.ReadFile(p)
	return string(b)
}
