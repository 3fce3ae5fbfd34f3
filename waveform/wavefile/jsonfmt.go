package wavefile

import (
	"bytes"
	"encoding/json"
)

// marshalDoc encodes v as indented JSON in which arrays holding no objects
// or arrays (sample arrays, for example) stay on one line. Field order is
// the struct order and floats use encoding/json's shortest round-trip
// form, so the output is a deterministic function of v. HTML characters
// are not escaped.
func marshalDoc(v any) ([]byte, error) {
	var raw bytes.Buffer
	enc := json.NewEncoder(&raw)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	src := bytes.TrimRight(raw.Bytes(), "\n")
	var out bytes.Buffer
	out.Grow(len(src) + len(src)/8)
	depth := 0
	newline := func() {
		out.WriteByte('\n')
		for i := 0; i < depth; i++ {
			out.WriteString("  ")
		}
	}
	for i := 0; i < len(src); i++ {
		c := src[i]
		switch c {
		case '"':
			j := skipString(src, i)
			out.Write(src[i:j])
			i = j - 1
		case '[', '{':
			if c == '[' {
				if end, flat := flatArray(src, i); flat {
					out.Write(src[i:end])
					i = end - 1
					continue
				}
			}
			out.WriteByte(c)
			if i+1 < len(src) && (src[i+1] == ']' || src[i+1] == '}') {
				out.WriteByte(src[i+1])
				i++
				continue
			}
			depth++
			newline()
		case ']', '}':
			depth--
			newline()
			out.WriteByte(c)
		case ',':
			out.WriteByte(',')
			newline()
		case ':':
			out.WriteString(": ")
		default:
			out.WriteByte(c)
		}
	}
	out.WriteByte('\n')
	return out.Bytes(), nil
}

// skipString returns the index just past the string literal starting at
// src[i] == '"'.
func skipString(src []byte, i int) int {
	for j := i + 1; j < len(src); j++ {
		switch src[j] {
		case '\\':
			j++
		case '"':
			return j + 1
		}
	}
	return len(src)
}

// flatArray reports whether the array starting at src[i] == '[' holds no
// objects or arrays, and returns the index just past its closing bracket.
func flatArray(src []byte, i int) (int, bool) {
	for j := i + 1; j < len(src); j++ {
		switch src[j] {
		case '"':
			j = skipString(src, j) - 1
		case '[', '{':
			return 0, false
		case ']':
			return j + 1, true
		}
	}
	return 0, false
}
