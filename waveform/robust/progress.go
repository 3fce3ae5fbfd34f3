package robust

import "sync"

// Progress is one report on a batch of simulations run by SweepAxis,
// SweepMap, Budget or dynamical.Compare (see SweepOptions.OnProgress).
type Progress struct {
	// Label names the batch, e.g. "sweep amplitude" or "robustness map".
	Label string
	// Done simulations out of Total.
	Done, Total int
	// Final is set on the last report of the batch, whether it finished,
	// failed or was cancelled.
	Final bool
}

// tracker counts finished simulations and forwards them to the
// callback one at a time.
type tracker struct {
	mu    sync.Mutex
	cb    func(Progress)
	label string
	total int
	done  int
}

func newTracker(opt *SweepOptions, label string, total int) *tracker {
	t := &tracker{label: label, total: total}
	if opt != nil {
		t.cb = opt.OnProgress
	}
	if t.cb != nil {
		t.cb(Progress{Label: label, Total: total})
	}
	return t
}

// add records one finished simulation.
func (t *tracker) add() {
	t.mu.Lock()
	defer t.mu.Unlock()
	t.done++
	if t.cb != nil {
		t.cb(Progress{Label: t.label, Done: t.done, Total: t.total})
	}
}

func (t *tracker) count() int {
	t.mu.Lock()
	defer t.mu.Unlock()
	return t.done
}

// finish sends the final report.
func (t *tracker) finish() {
	t.mu.Lock()
	defer t.mu.Unlock()
	if t.cb != nil {
		t.cb(Progress{Label: t.label, Done: t.done, Total: t.total, Final: true})
	}
}
