package main

import (
	"bytes"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/design"
)

// TestProgressBar feeds the bar the reports of a batch of 41 simulations
// and checks the line it draws: carriage returns, the full bar at the end
// and one closing newline.
func TestProgressBar(t *testing.T) {
	var buf bytes.Buffer
	bar := newProgressBar(&buf)
	for done := 0; done <= 41; done++ {
		bar(design.Progress{Label: "sweep", Done: done, Total: 41})
	}
	bar(design.Progress{Label: "sweep", Done: 41, Total: 41, Final: true})
	out := buf.String()
	if !strings.HasPrefix(out, "\rsweep [") || !strings.HasSuffix(out, "] 100.0% 41/41\n") {
		t.Errorf("bar output ends %q", out[max(0, len(out)-60):])
	}
	if n := strings.Count(out, "\n"); n != 1 {
		t.Errorf("%d newlines, want 1", n)
	}
	if !strings.Contains(out, "\rsweep ["+strings.Repeat("#", barCells)+"]") {
		t.Error("no full bar drawn")
	}
	// A batch that ends before any simulation draws only its start.
	buf.Reset()
	bar(design.Progress{Label: "map", Total: 10})
	bar(design.Progress{Label: "map", Total: 10, Final: true})
	if out := buf.String(); out != "\rmap ["+strings.Repeat(".", barCells)+"]   0.0% 0/10\n" {
		t.Errorf("empty batch: %q", out)
	}
}
