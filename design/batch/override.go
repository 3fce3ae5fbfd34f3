package batch

import (
	"bytes"
	"errors"
	"fmt"
	"sort"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// baseSpec is the base spec's YAML node tree. Task specs are copies of it
// with the table's cells and the target gate written in.
type baseSpec struct {
	name string     // base name of the file, for comments
	root *yaml.Node // the mapping at the top of the document
	doc  *yaml.Node // the document node
}

// readBase parses the base spec's YAML into a node tree. The spec itself
// is validated by the spec parser; here only the shape matters: one
// document whose top is a mapping.
func readBase(data []byte, name string) (*baseSpec, error) {
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return nil, fmt.Errorf("base spec %s: %w", name, err)
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		return nil, fmt.Errorf("base spec %s: expected a YAML mapping (a spec) at the top", name)
	}
	return &baseSpec{name: name, root: doc.Content[0], doc: &doc}, nil
}

// errNoField says a path names no field of the base spec.
var errNoField = errors.New("no such field in the base spec")

// segment is one step of a field path: a mapping key, or a list index
// when key is empty.
type segment struct {
	key   string
	index int
}

// splitPath splits "scheme.channels[1].upper" into its segments.
func splitPath(path string) ([]segment, error) {
	if path == "" {
		return nil, errors.New("empty field path")
	}
	var segs []segment
	for _, part := range strings.Split(path, ".") {
		key, rest, _ := strings.Cut(part, "[")
		if key == "" && len(segs) == 0 {
			return nil, fmt.Errorf("field path %q starts with an index", path)
		}
		if key != "" {
			segs = append(segs, segment{key: key})
		} else if rest == "" {
			return nil, fmt.Errorf("field path %q has an empty part", path)
		}
		for rest != "" {
			num, after, ok := strings.Cut(rest, "]")
			i, err := strconv.Atoi(num)
			if !ok || err != nil || i < 0 || (after != "" && after[0] != '[') {
				return nil, fmt.Errorf("field path %q: bad list index in %q", path, part)
			}
			segs = append(segs, segment{index: i})
			rest = strings.TrimPrefix(after, "[")
		}
	}
	return segs, nil
}

// lookup returns the node at path below root. It does not follow YAML
// aliases: a value reached through an alias is shared with other fields,
// so overriding it would change them too.
func lookup(root *yaml.Node, path string) (*yaml.Node, error) {
	segs, err := splitPath(path)
	if err != nil {
		return nil, err
	}
	n := root
	for _, s := range segs {
		if n.Kind == yaml.AliasNode {
			return nil, fmt.Errorf("%s: the base spec reaches it through a YAML alias (*%s); write the value out in the base spec", path, n.Value)
		}
		var next *yaml.Node
		switch {
		case s.key != "" && n.Kind == yaml.MappingNode:
			for i := 0; i+1 < len(n.Content); i += 2 {
				if n.Content[i].Value == s.key {
					next = n.Content[i+1]
				}
			}
		case s.key == "" && n.Kind == yaml.SequenceNode && s.index < len(n.Content):
			next = n.Content[s.index]
		}
		if next == nil {
			return nil, errNoField
		}
		n = next
	}
	if n.Kind == yaml.AliasNode {
		return nil, fmt.Errorf("%s: the base spec gives it as a YAML alias (*%s); write the value out in the base spec", path, n.Value)
	}
	return n, nil
}

// leafPaths lists the paths of the base spec's scalar and list values, for
// suggestions when a column names no field.
func leafPaths(n *yaml.Node, prefix string, out *[]string) {
	switch n.Kind {
	case yaml.MappingNode:
		for i := 0; i+1 < len(n.Content); i += 2 {
			p := n.Content[i].Value
			if prefix != "" {
				p = prefix + "." + p
			}
			leafPaths(n.Content[i+1], p, out)
		}
	case yaml.SequenceNode:
		*out = append(*out, prefix)
		for i, c := range n.Content {
			if c.Kind == yaml.MappingNode {
				leafPaths(c, fmt.Sprintf("%s[%d]", prefix, i), out)
			}
		}
	default:
		*out = append(*out, prefix)
	}
}

// checkColumn checks that a column header names a value of the base spec
// that a table cell may replace: a scalar or a list, not a section and not
// the target (which comes from the gate list).
func (b *baseSpec) checkColumn(path string) error {
	if path == "target" || strings.HasPrefix(path, "target.") || strings.HasPrefix(path, "target[") {
		return errors.New("the target gate comes from the gate list, not from the table")
	}
	n, err := lookup(b.root, path)
	if errors.Is(err, errNoField) {
		var paths []string
		leafPaths(b.root, "", &paths)
		msg := "the base spec has no field " + path + "; a column names a field of the base spec by its path, and the base spec gives its default"
		if c := closestPath(path, paths); c != "" {
			msg += fmt.Sprintf(" (did you mean %s?)", c)
		}
		return errors.New(msg)
	}
	if err != nil {
		return err
	}
	if n.Kind == yaml.MappingNode {
		var paths []string
		leafPaths(n, path, &paths)
		return fmt.Errorf("%s is a section of the spec; name one of its fields: %s", path, strings.Join(paths, ", "))
	}
	return nil
}

// cellNode reads a table cell as a YAML flow value: a plain scalar such as
// 0.02, true or 18.5 MHz, or a flow list such as [20 MHz, 18 MHz].
func cellNode(cell string) (*yaml.Node, error) {
	var doc yaml.Node
	if err := yaml.Unmarshal([]byte(cell), &doc); err != nil || len(doc.Content) != 1 {
		return nil, fmt.Errorf("%q is not a single value", cell)
	}
	n := doc.Content[0]
	if n.Kind == yaml.MappingNode || n.Kind == yaml.AliasNode || n.Anchor != "" {
		return nil, fmt.Errorf("%q is not a single value or a list of values", cell)
	}
	return n, nil
}

// taskSpecBytes returns the spec of one task: a copy of the base with the
// row's non-empty cells written at their columns' paths, target.gate set
// to gate, and comments saying where each value came from.
func (b *baseSpec) taskSpecBytes(t *Table, row *Row, gate string) ([]byte, error) {
	root := copyNode(b.root)
	for j, col := range t.Columns {
		cell := row.Cells[j]
		if cell == "" {
			continue
		}
		n, err := lookup(root, col)
		if err != nil {
			return nil, err
		}
		v, err := cellNode(cell)
		if err != nil {
			return nil, err
		}
		*n = *v
		n.LineComment = fmt.Sprintf("%s row %d", t.Name, row.Line)
	}
	setTarget(root, gate)
	doc := &yaml.Node{Kind: yaml.DocumentNode, Content: []*yaml.Node{root},
		HeadComment: fmt.Sprintf("Task spec written by loopgate batch plan: %s with the values of %s row %d (%s %s) and target gate %s.",
			b.name, t.Name, row.Line, t.QubitColumn, row.Qubit, gate)}
	var buf bytes.Buffer
	enc := yaml.NewEncoder(&buf)
	enc.SetIndent(2)
	if err := enc.Encode(doc); err != nil {
		return nil, err
	}
	if err := enc.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// setTarget replaces the spec's target section with {gate: name}.
func setTarget(root *yaml.Node, gate string) {
	val := &yaml.Node{Kind: yaml.MappingNode, Content: []*yaml.Node{
		{Kind: yaml.ScalarNode, Value: "gate"},
		{Kind: yaml.ScalarNode, Value: gate, Tag: "!!str"},
	}}
	for i := 0; i+1 < len(root.Content); i += 2 {
		if root.Content[i].Value == "target" {
			root.Content[i+1] = val
			return
		}
	}
	root.Content = append(root.Content, &yaml.Node{Kind: yaml.ScalarNode, Value: "target"}, val)
}

// copyNode copies a node tree. Alias nodes keep pointing at the original
// anchors, which the encoder only reads.
func copyNode(n *yaml.Node) *yaml.Node {
	c := *n
	if n.Content != nil {
		c.Content = make([]*yaml.Node, len(n.Content))
		for i, k := range n.Content {
			c.Content[i] = copyNode(k)
		}
	}
	return &c
}

// closestPath returns the candidate nearest to p in edit distance, or ""
// when none is close.
func closestPath(p string, cands []string) string {
	sort.Strings(cands)
	best, bestD := "", len(p)/2+2
	for _, c := range cands {
		if d := editDistance(p, c); d < bestD {
			best, bestD = c, d
		}
	}
	return best
}

// editDistance is the Levenshtein distance between a and b.
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
