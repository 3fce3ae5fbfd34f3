package report

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

// The browser test renders the synthetic report in headless Chromium and
// looks at the pixels: every figure must show drawn content in its own
// series colours, and the tables must be in the document Chromium built.
//
// It needs Debian's chromium. Without it the test is skipped, unless the
// environment variable CI is set, where a missing browser is a failure.
// Set LOOPGATE_REPORT_PNG to a file name to keep the full-page screenshot.

const (
	browserWidth  = 1280
	browserHeight = 6400 // taller than the synthetic report
)

func chromium(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "/usr/bin/chromium"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	if os.Getenv("CI") != "" {
		t.Fatal("chromium not found; CI must install it (apt-get install chromium)")
	}
	t.Skip("chromium not found; skipping the browser test (set CI to make this a failure)")
	return ""
}

// runChromium runs headless Chromium with a private profile and no network
// services, returning its standard output.
func runChromium(t *testing.T, bin string, args ...string) []byte {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 120*time.Second)
	defer cancel()
	base := []string{
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--hide-scrollbars", "--force-device-scale-factor=1",
		"--user-data-dir=" + t.TempDir(),
	}
	cmd := exec.CommandContext(ctx, bin, append(base, args...)...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium %v: %v\n%s", args, err, tail(errb.String(), 2000))
	}
	return out.Bytes()
}

func tail(s string, n int) string {
	if len(s) > n {
		return s[len(s)-n:]
	}
	return s
}

func screenshot(t *testing.T, bin, page, png string) image.Image {
	t.Helper()
	runChromium(t, bin, "--screenshot="+png, fmt.Sprintf("--window-size=%d,%d", browserWidth, browserHeight), "file://"+page)
	return decodePNG(t, png)
}

func decodePNG(t *testing.T, name string) image.Image {
	t.Helper()
	f, err := os.Open(name)
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("screenshot %s: %v", name, err)
	}
	return img
}

// Outline colours the test gives each figure to find it in the screenshot;
// pure saturated colours that the report never uses.
var markColours = map[string]color.NRGBA{
	"fig-loop":        {255, 0, 255, 255},
	"fig-waveforms":   {0, 255, 255, 255},
	"fig-populations": {255, 255, 0, 255},
	"fig-robustness":  {0, 255, 0, 255},
	"fig-map":         {255, 0, 0, 255},
}

// figureColours are series colours that each figure must show.
func figureColours() map[string][]color.NRGBA {
	return map[string][]color.NRGBA{
		"fig-loop":        {colGeo},
		"fig-waveforms":   {series[0].color.(color.NRGBA), series[1].color.(color.NRGBA), series[2].color.(color.NRGBA)},
		"fig-populations": {series[0].color.(color.NRGBA), series[1].color.(color.NRGBA), series[2].color.(color.NRGBA)},
		"fig-robustness":  {colGeo, colDyn},
		"fig-map":         {mapAnchors[0], mapAnchors[3], mapAnchors[5]},
	}
}

func close3(c color.Color, want color.NRGBA, tol int) bool {
	r, g, b, _ := c.RGBA()
	d := func(x uint32, y uint8) int {
		v := int(x>>8) - int(y)
		if v < 0 {
			return -v
		}
		return v
	}
	return d(r, want.R) <= tol && d(g, want.G) <= tol && d(b, want.B) <= tol
}

// rgba returns img as *image.RGBA for direct pixel access.
func rgba(img image.Image) *image.RGBA {
	if r, ok := img.(*image.RGBA); ok {
		return r
	}
	r := image.NewRGBA(img.Bounds())
	draw.Draw(r, r.Bounds(), img, img.Bounds().Min, draw.Src)
	return r
}

// bounds returns the bounding boxes of pixels of exactly the colours cs,
// which must be fully saturated (every channel 0 or 255).
func bounds(img *image.RGBA, cs map[string]color.NRGBA) map[string]image.Rectangle {
	ids := make([]string, 0, len(cs))
	for id := range cs {
		ids = append(ids, id)
	}
	out := make(map[string]image.Rectangle)
	b := img.Bounds()
	sat := func(v uint8) bool { return v == 0 || v == 255 }
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			c := img.RGBAAt(x, y)
			if !sat(c.R) || !sat(c.G) || !sat(c.B) {
				continue
			}
			for _, id := range ids {
				want := cs[id]
				if c.R == want.R && c.G == want.G && c.B == want.B {
					p := image.Rect(x, y, x+1, y+1)
					if r := out[id]; r.Empty() {
						out[id] = p
					} else {
						out[id] = r.Union(p)
					}
				}
			}
		}
	}
	return out
}

func TestBrowserRendersReport(t *testing.T) {
	if testing.Short() {
		t.Skip("browser test skipped in -short mode")
	}
	bin := chromium(t)
	dir := t.TempDir()
	var buf bytes.Buffer
	if err := Write(&buf, syntheticData()); err != nil {
		t.Fatal(err)
	}
	page := filepath.Join(dir, "report.html")
	if err := os.WriteFile(page, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}

	// 1. The document Chromium built holds every table and figure.
	dom := string(runChromium(t, bin, "--dump-dom", "file://"+page))
	checkRenderedDOM(t, dom)
	// 2. The page as a reader sees it.
	clean := screenshot(t, bin, page, filepath.Join(dir, "report.png"))
	bg := color.NRGBA{0xe9, 0xec, 0xee, 255}
	savePNG(t, clean, bg)
	// The window must hold the whole page: the bottom rows show only the
	// page background.
	cb := clean.Bounds()
	for y := cb.Max.Y - 40; y < cb.Max.Y; y++ {
		for x := cb.Min.X; x < cb.Max.X; x += 7 {
			if !close3(clean.At(x, y), bg, 2) {
				t.Fatalf("page is taller than the %d px window (content at row %d)", browserHeight, y)
			}
		}
	}

	// 3. The same page with a coloured outline round each figure, to find
	// the figures; outlines do not move anything.
	var marks strings.Builder
	for id, c := range markColours {
		fmt.Fprintf(&marks, "#%s { outline: 3px solid rgb(%d,%d,%d); outline-offset: 6px; }\n", id, c.R, c.G, c.B)
	}
	marked := strings.Replace(buf.String(), "</head>", "<style>\n"+marks.String()+"</style>\n</head>", 1)
	mpage := filepath.Join(dir, "marked.html")
	if err := os.WriteFile(mpage, []byte(marked), 0o644); err != nil {
		t.Fatal(err)
	}
	boxes := bounds(rgba(screenshot(t, bin, mpage, filepath.Join(dir, "marked.png"))), markColours)

	// 4. Judge each figure's panels, left of its key column, in the
	// unmarked screenshot: a share of drawn pixels, and each expected series
	// colour on the data (the key alone cannot satisfy this).
	checkFigurePixels(t, rgba(clean), boxes)
}

// checkRenderedDOM checks that the document Chromium built holds every
// table (with rows) and every figure (with an SVG).
func checkRenderedDOM(t *testing.T, dom string) {
	t.Helper()
	for _, id := range tableIDs {
		re := regexp.MustCompile(`<table id="` + id + `"[^>]*>[\s\S]*?</table>`)
		tab := re.FindString(dom)
		if tab == "" {
			t.Errorf("table %s missing from the rendered document", id)
			continue
		}
		if n := strings.Count(tab, "<tr"); n < 2 {
			t.Errorf("table %s has %d rows in the rendered document", id, n)
		}
	}
	for _, id := range figureIDs {
		re := regexp.MustCompile(`<figure id="` + id + `"[^>]*>\s*<svg `)
		if !re.MatchString(dom) {
			t.Errorf("figure %s has no SVG in the rendered document", id)
		}
	}

}

// savePNG writes the page part of the screenshot, with a margin of
// background below it, to $LOOPGATE_REPORT_PNG when that is set.
func savePNG(t *testing.T, clean image.Image, bg color.NRGBA) {
	t.Helper()
	out := os.Getenv("LOOPGATE_REPORT_PNG")
	if out == "" {
		return
	}
	// Keep the page and a margin of background below it.
	full := rgba(clean)
	last := full.Bounds().Min.Y
	for y := full.Bounds().Min.Y; y < full.Bounds().Max.Y; y++ {
		for x := full.Bounds().Min.X; x < full.Bounds().Max.X; x += 3 {
			if !close3(full.RGBAAt(x, y), bg, 2) {
				last = y
				break
			}
		}
	}
	trimmed := full.SubImage(image.Rect(full.Bounds().Min.X, full.Bounds().Min.Y, full.Bounds().Max.X, min(full.Bounds().Max.Y, last+28)))
	var b bytes.Buffer
	if err := png.Encode(&b, trimmed); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(out, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// checkFigurePixels judges each figure's panels, left of its key column:
// a share of drawn pixels, and each expected series colour on the data
// (the key alone cannot satisfy this).
func checkFigurePixels(t *testing.T, img *image.RGBA, boxes map[string]image.Rectangle) {
	t.Helper()
	want := figureColours()
	panelPx := int(math.Floor((figW - keyW - keyGap) * pxPerPt))
	for _, id := range figureIDs {
		box := boxes[id]
		if box.Dx() < 600 || box.Dy() < 200 {
			t.Errorf("figure %s: outline found at %v; want a figure at least 600×200 px", id, box)
			continue
		}
		fig := box.Inset(9) // 3 px outline drawn 6 px outside the figure
		area := image.Rect(fig.Min.X, fig.Min.Y, fig.Min.X+panelPx-4, fig.Max.Y)
		var ink, total int
		counts := make([]int, len(want[id]))
		for y := area.Min.Y; y < area.Max.Y; y++ {
			for x := area.Min.X; x < area.Max.X; x++ {
				c := img.RGBAAt(x, y)
				total++
				if !close3(c, color.NRGBA{255, 255, 255, 255}, 8) {
					ink++
				}
				for k, w := range want[id] {
					if close3(c, w, 24) {
						counts[k]++
					}
				}
			}
		}
		frac := float64(ink) / float64(total)
		t.Logf("figure %s: panels %v, %.1f%% drawn, series colour pixels %v", id, area, 100*frac, counts)
		if frac < 0.03 {
			t.Errorf("figure %s looks blank: only %.2f%% of its area is drawn", id, 100*frac)
		}
		for k, n := range counts {
			if n < 40 {
				t.Errorf("figure %s: colour %v drawn on %d pixels; want its data drawn", id, want[id][k], n)
			}
		}
	}
}
