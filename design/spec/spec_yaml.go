package spec

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// maxSpecDepth bounds the nesting of YAML collections in a spec.
const maxSpecDepth = 32

// segSep joins the path segments of index keys; it cannot occur in YAML
// keys the spec accepts and matches gojsonschema contexts printed with it.
const segSep = "\x00"

// pos is the YAML position of one node of a spec.
type pos struct {
	path            string // human path: scheme.levels[2].name
	line, col       int    // the value
	keyLine, keyCol int    // the key of a mapping entry (else = line, col)
	container       bool   // a mapping or a list
}

// index maps the nodes of a spec to their YAML positions, by gojsonschema
// context ("(root)\x00scheme\x00levels\x002") and by human path.
type index struct {
	bySegs map[string]pos
	byPath map[string]pos
}

func (x *index) add(segs string, p pos) {
	x.bySegs[segs] = p
	x.byPath[p.path] = p
}

// locate fills the position of a problem from its path. A path not in the
// file is reported at its nearest ancestor that is: a value written once
// for every channel (hardware.max_rabi for hardware.max_rabi.p0) takes
// over the ancestor's path, while a field left out (a default) keeps its
// own path and gets the position of the section it belongs to (none for
// a top-level field).
func (x *index) locate(p Problem) Problem {
	if p.Line > 0 {
		return p
	}
	for path := p.Path; ; {
		if q, ok := x.byPath[path]; ok {
			switch {
			case !q.container:
				p.Path, p.Line, p.Col = q.path, q.line, q.col
			case q.path != "" || path == p.Path:
				p.Line, p.Col = q.line, q.col
			}
			return p
		}
		if path == "" {
			return p
		}
		path = parentPath(path)
	}
}

func parentPath(p string) string {
	if strings.HasSuffix(p, "]") {
		if i := strings.LastIndexByte(p, '['); i >= 0 {
			return p[:i]
		}
	}
	if i := strings.LastIndexByte(p, '.'); i >= 0 {
		return p[:i]
	}
	return ""
}

func childPath(parent, key string) string {
	if parent == "" {
		return key
	}
	return parent + "." + key
}

var yamlLineRE = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// readYAML parses one YAML document into JSON-compatible data (maps,
// slices, string, bool, nil, int64, uint64 and finite float64) and indexes
// the position of every node.
func readYAML(data []byte) (doc any, idx *index, prob *Problem) {
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, nil, &Problem{Msg: "file is empty; expected a YAML spec with spec_version, target, scheme, method and hardware"}
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var root yaml.Node
	if err := safeDecode(dec, &root, 0); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, nil, &Problem{Msg: "file holds no YAML content (only comments or blank lines); expected a YAML spec with spec_version, target, scheme, method and hardware"}
		}
		return nil, nil, yamlProblem(err)
	}
	var second yaml.Node
	if err := safeDecode(dec, &second, 1); err == nil {
		if second.Kind != 0 && !(second.Kind == yaml.DocumentNode && len(second.Content) == 0) {
			return nil, nil, &Problem{Line: second.Line, Col: second.Column, Msg: "a second YAML document starts here; a spec is one document (remove the '---' separator)"}
		}
	} else if !errors.Is(err, io.EOF) {
		return nil, nil, yamlProblem(err)
	}
	c := &yconv{idx: &index{bySegs: map[string]pos{}, byPath: map[string]pos{}}}
	top := &root
	if top.Kind == yaml.DocumentNode {
		if len(top.Content) == 0 {
			return nil, nil, &Problem{Msg: "file holds no YAML content; expected a YAML spec with spec_version, target, scheme, method and hardware"}
		}
		top = top.Content[0]
	}
	doc = c.conv(top, "(root)", "", top.Line, top.Column, 0)
	if c.prob != nil {
		return nil, nil, c.prob
	}
	return doc, c.idx, nil
}

// safeDecode decodes one document, turning a panic inside the YAML library
// into an error so that no input can crash the tool.
func safeDecode(dec *yaml.Decoder, n *yaml.Node, which int) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("yaml: the YAML reader failed on document %d: %v", which+1, r)
		}
	}()
	return dec.Decode(n)
}

func yamlProblem(err error) *Problem {
	msg := err.Error()
	if m := yamlLineRE.FindStringSubmatch(msg); m != nil {
		line, _ := strconv.Atoi(m[1])
		return &Problem{Line: line, Msg: "malformed YAML: " + m[2]}
	}
	return &Problem{Msg: "malformed YAML: " + strings.TrimPrefix(msg, "yaml: ")}
}

type yconv struct {
	idx   *index
	nodes int
	prob  *Problem
}

func (c *yconv) fail(path string, line, col int, format string, args ...any) any {
	if c.prob == nil {
		c.prob = &Problem{Path: path, Line: line, Col: col, Msg: fmt.Sprintf(format, args...)}
	}
	return nil
}

// conv converts node n found at segs/path; keyLine/keyCol locate its key.
func (c *yconv) conv(n *yaml.Node, segs, path string, keyLine, keyCol, depth int) any {
	if c.prob != nil {
		return nil
	}
	c.nodes++
	if c.nodes > MaxSpecNodes {
		return c.fail("", n.Line, n.Column, "the spec has more than %d YAML nodes (counting alias expansions); a spec is a short file", MaxSpecNodes)
	}
	if depth > maxSpecDepth {
		return c.fail("", n.Line, n.Column, "nesting deeper than %d levels; a spec is a shallow file", maxSpecDepth)
	}
	line, col := n.Line, n.Column
	if n.Kind == yaml.AliasNode {
		if n.Alias == nil {
			return c.fail(path, line, col, "alias *%s refers to nothing", n.Value)
		}
		n = n.Alias
	}
	container := n.Kind == yaml.MappingNode || n.Kind == yaml.SequenceNode
	c.idx.add(segs, pos{path: path, line: line, col: col, keyLine: keyLine, keyCol: keyCol, container: container})
	switch n.Kind {
	case yaml.MappingNode:
		m := make(map[string]any, len(n.Content)/2)
		first := make(map[string]int, len(n.Content)/2)
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			if k.Kind != yaml.ScalarNode {
				return c.fail(path, k.Line, k.Column, "a mapping key must be a plain word, found a YAML %s", kindName(k))
			}
			if k.Tag == "!!merge" || k.Value == "<<" {
				return c.fail(path, k.Line, k.Column, "YAML merge keys (<<) are not supported in a spec; write the fields out")
			}
			if l, dup := first[k.Value]; dup {
				return c.fail(childPath(path, k.Value), k.Line, k.Column, "key %q appears twice (first at line %d)", k.Value, l)
			}
			first[k.Value] = k.Line
			m[k.Value] = c.conv(v, segs+segSep+k.Value, childPath(path, k.Value), k.Line, k.Column, depth+1)
		}
		return m
	case yaml.SequenceNode:
		s := make([]any, len(n.Content))
		for i, v := range n.Content {
			s[i] = c.conv(v, segs+segSep+strconv.Itoa(i), fmt.Sprintf("%s[%d]", path, i), v.Line, v.Column, depth+1)
		}
		return s
	case yaml.ScalarNode:
		return c.scalar(n, path, line, col)
	}
	return c.fail(path, line, col, "unexpected YAML node")
}

func (c *yconv) scalar(n *yaml.Node, path string, line, col int) any {
	switch tag := n.ShortTag(); tag {
	case "!!null":
		return nil
	case "!!bool":
		var b bool
		if err := n.Decode(&b); err != nil {
			return c.fail(path, line, col, "%q is not a boolean (true or false)", n.Value)
		}
		return b
	case "!!int":
		var v any
		if err := n.Decode(&v); err != nil {
			return c.fail(path, line, col, "%q is not a whole number", n.Value)
		}
		switch x := v.(type) {
		case int:
			return int64(x)
		case int64:
			return x
		case uint64:
			return x
		case float64:
			return c.float(x, n, path, line, col)
		}
		return c.fail(path, line, col, "%q is not a whole number", n.Value)
	case "!!float":
		var x float64
		if err := n.Decode(&x); err != nil {
			return c.fail(path, line, col, "%q is not a number", n.Value)
		}
		return c.float(x, n, path, line, col)
	case "!!str", "!!timestamp", "!!binary":
		return n.Value
	default:
		return c.fail(path, line, col, "YAML tag %s is not supported in a spec; write a plain value", tag)
	}
}

func (c *yconv) float(x float64, n *yaml.Node, path string, line, col int) any {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return c.fail(path, line, col, "%s is not a finite number; expected a finite value", n.Value)
	}
	return x
}

func kindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "mapping"
	case yaml.SequenceNode:
		return "list"
	case yaml.AliasNode:
		return "alias"
	}
	return "value"
}
