package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/loopgate/loopgate/design"
)

// barCells is the width of the progress bar in characters.
const barCells = 30

// progressBar draws a one-line progress bar for each batch of
// simulations, redrawn with a carriage return when the shown permille
// changes and ended with a newline.
type progressBar struct {
	w      io.Writer
	drawn  int // last permille drawn, −1 before the first
	active bool
}

// newProgressBar returns a design.Options.OnProgress callback drawing on w.
func newProgressBar(w io.Writer) func(design.Progress) {
	b := &progressBar{w: w, drawn: -1}
	return b.report
}

func (b *progressBar) report(p design.Progress) {
	if p.Final {
		if b.active {
			fmt.Fprintln(b.w)
		}
		b.active, b.drawn = false, -1
		return
	}
	if p.Total <= 0 {
		return
	}
	pm := p.Done * 1000 / p.Total
	if pm == b.drawn {
		return
	}
	b.drawn = pm
	full := p.Done * barCells / p.Total
	// Write errors are ignored: the bar is a courtesy, not output.
	fmt.Fprintf(b.w, "\r%s [%s%s] %5.1f%% %d/%d", p.Label,
		strings.Repeat("#", full), strings.Repeat(".", barCells-full),
		float64(pm)/10, p.Done, p.Total)
	b.active = true
}
