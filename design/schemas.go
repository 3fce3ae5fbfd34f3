package design

import (
	"fmt"
	"strings"

	"github.com/loopgate/loopgate/schemas"
)

var schemaTable = []struct {
	name string
	text []byte
}{
	{"spec", schemas.Spec},
	{"waveform", schemas.Waveform},
	{"loop", schemas.Loop},
}

// SchemaNames lists the file formats whose JSON Schema Schema returns.
func SchemaNames() []string {
	var out []string
	for _, s := range schemaTable {
		out = append(out, s.name)
	}
	return out
}

// Schema returns a copy of the JSON Schema of the named file format
// ("spec", "waveform" or "loop").
func Schema(name string) ([]byte, error) {
	for _, s := range schemaTable {
		if s.name == name {
			return append([]byte(nil), s.text...), nil
		}
	}
	return nil, fmt.Errorf("unknown schema %q; known: %s", name, strings.Join(SchemaNames(), ", "))
}
