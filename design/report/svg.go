package report

import (
	"bytes"
	"fmt"
	"html"
	"strings"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// pxPerPt is the CSS pixel size of one point: figures are laid out in
// points and shown at 96 CSS pixels per inch.
const pxPerPt = 4.0 / 3.0

// fontStack replaces the bare font family written by vgsvg. Liberation Sans
// is the face the plots are measured with; Arimo, Arial and Helvetica share
// its metrics, so text keeps its place where it is missing.
const fontStack = "font-family:'Liberation Sans',Arimo,Arial,Helvetica,sans-serif;"

// renderSVG draws a figure of w×h points with paint and returns it as an
// SVG element ready to sit inside an HTML page: the XML prologue is dropped,
// the font family gets fallbacks, embedded images are labelled as the PNG
// data they are and stretched to their rectangles, and the element gets an
// accessible label. The output
// depends only on what paint draws.
func renderSVG(w, h float64, label string, paint func(dc draw.Canvas) error) (string, error) {
	c := vgsvg.NewWith(vgsvg.UseWH(vg.Points(w), vg.Points(h)))
	if err := paint(draw.New(c)); err != nil {
		return "", err
	}
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return "", fmt.Errorf("report: writing SVG: %w", err)
	}
	s := buf.String()
	i := strings.Index(s, "<svg")
	if i < 0 {
		return "", fmt.Errorf("report: SVG writer produced no <svg> element")
	}
	s = s[i:]
	s = strings.Replace(s, "<svg ", fmt.Sprintf(`<svg class="plot" role="img" aria-label="%s" `, html.EscapeString(label)), 1)
	s = strings.ReplaceAll(s, "font-family:Liberation Sans;", fontStack)
	s = strings.ReplaceAll(s, "data:image/jpg;base64,", "data:image/png;base64,")
	// Images (heat maps, colour bars) must fill their rectangle exactly;
	// SVG would otherwise keep the pixel aspect ratio and centre them.
	s = strings.ReplaceAll(s, "<image ", `<image preserveAspectRatio="none" `)
	return strings.TrimRight(s, "\n"), nil
}
