package report_test

import (
	"bytes"
	"fmt"
	"log"
	"regexp"
	"strings"

	"github.com/loopgate/loopgate/design/report"
)

// A report with only the headline and the verification summary: the other
// sections say in one line that they are left out. (Demonstration numbers.)
func ExampleWrite() {
	d := &report.Data{
		Title:  "X gate on a Λ system (demonstration numbers)",
		Gate:   "X",
		Scheme: "Λ: qubit g0, g1; excited e; channels p0, p1",
		Advantage: []report.AdvantageRow{
			{Axis: "amplitude error ε", Unit: "%", Geometric: 9.2, Dynamical: 3.1, Ratio: 9.2 / 3.1},
		},
		Verification: &report.Verification{Fidelity: 0.99991, Leakage: 3e-5, Duration: 2e-6, Samples: 1000},
	}
	var page bytes.Buffer
	if err := report.Write(&page, d); err != nil {
		log.Fatal(err)
	}
	html := page.String()
	for _, m := range regexp.MustCompile(`<section id="([a-z-]+)"`).FindAllStringSubmatch(html, -1) {
		fmt.Println(m[1])
	}
	fmt.Println("sections left out:", strings.Count(html, `<p class="missing">`))
	fmt.Println("headline ratio shown:", strings.Contains(html, `<p class="big">3.0×</p>`))
	// Output:
	// sec-advantage
	// sec-summary
	// sec-loop
	// sec-waveforms
	// sec-populations
	// sec-robustness
	// sec-map
	// sec-budget
	// sec-hardware
	// sec-cautions
	// sec-provenance
	// sections left out: 7
	// headline ratio shown: true
}
