package spec

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// FuzzParseSpec feeds arbitrary bytes to ParseSpec. It must not panic or
// hang; every failure must be a *SpecError naming the file, and the same
// input must give the same answer; an accepted spec must pass Validate and
// hold a unitary target and a scheme. The seed corpus is the demo specs,
// the starters and every bad-input file.
func FuzzParseSpec(f *testing.F) {
	var seeds []string
	for _, pat := range []string{"../../testdata/*.yaml", "../../testdata/bad/*.yaml", "starter/*.yaml"} {
		m, _ := filepath.Glob(pat)
		seeds = append(seeds, m...)
	}
	for _, s := range seeds {
		if b, err := os.ReadFile(s); err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte(minimalSpec))
	f.Add([]byte("spec_version: 1\ntarget: {unitary: [[1, 0], [0, \"1i\"]]}\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 64<<10 {
			return // larger inputs only repeat the size check
		}
		s, err := ParseSpec(data, "fuzz.yaml")
		if err != nil {
			var se *SpecError
			if !errors.As(err, &se) || len(se.Problems) == 0 {
				t.Fatalf("error %T %q is not a *SpecError with problems", err, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "spec fuzz.yaml: ") {
				t.Fatalf("message does not name the file: %q", msg)
			}
			if _, err2 := ParseSpec(data, "fuzz.yaml"); err2 == nil || err2.Error() != msg {
				t.Fatalf("second parse differs:\n%v\n%v", err, err2)
			}
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("accepted spec fails Validate: %v", err)
		}
		if s.Scheme == nil || s.Target.U == nil || holonomy.UnitarityError(s.Target.U) > UnitarityTol {
			t.Fatalf("accepted spec without scheme or unitary target: %+v", s)
		}
	})
}
