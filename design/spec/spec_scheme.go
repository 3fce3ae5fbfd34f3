package spec

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
)

func levelNames(sc *holonomy.Scheme) string {
	n := make([]string, len(sc.Levels))
	for i, l := range sc.Levels {
		n[i] = l.Name
	}
	return strings.Join(n, ", ")
}

func levelIndex(sc *holonomy.Scheme, name string) int {
	for i, l := range sc.Levels {
		if l.Name == name {
			return i
		}
	}
	return -1
}

func (d *decoder) scheme(s *Spec, m map[string]any, path string) {
	preset, hasPreset := m["preset"].(string)
	_, hasLevels := m["levels"]
	_, hasChannels := m["channels"]
	switch {
	case hasPreset && (hasLevels || hasChannels):
		d.bad(path, "give either preset or levels and channels, not both")
		return
	case hasPreset:
		d.preset(s, m, path, preset)
	case hasLevels || hasChannels:
		d.graph(s, m, path, hasLevels, hasChannels)
	default:
		d.bad(path, "give a preset (tripod, lambda, spin-1/2 or spin) or an explicit coupling graph (levels and channels)")
		return
	}
	if s.Scheme == nil {
		return
	}
	sc := s.Scheme
	if q, ok := m["qubit"].([]any); ok {
		sc.Computational = sc.Computational[:0]
		for i, v := range q {
			name, _ := v.(string)
			k := levelIndex(sc, name)
			if k < 0 {
				d.bad(fmt.Sprintf("%s.qubit[%d]", path, i), "no level %q in the scheme; its levels are %s", name, levelNames(sc))
				continue
			}
			sc.Computational = append(sc.Computational, k)
		}
	} else if !hasPreset {
		d.bad(path+".qubit", "missing; name the two qubit levels, |0⟩ first, e.g. [g0, g1]")
	}
	if !IsSpinPreset(s.Preset) {
		s.Excited = sc.ExcitedLevels()
	}
}

func contains(s []int, x int) bool {
	for _, v := range s {
		if v == x {
			return true
		}
	}
	return false
}

func (d *decoder) preset(s *Spec, m map[string]any, path, preset string) {
	for _, k := range []string{"name"} {
		if _, ok := m[k]; ok {
			d.bad(path+"."+k, "only used with an explicit coupling graph (levels and channels)")
		}
	}
	if _, ok := m["spin"]; ok && preset != "spin" {
		d.bad(path+".spin", "only used with preset: spin")
	}
	switch preset {
	case "tripod":
		s.Scheme = holonomy.Tripod()
	case "lambda":
		s.Scheme = holonomy.Lambda()
	case "spin-1/2":
		s.Scheme = holonomy.Spin(1, 0, 1)
	case "spin":
		v, ok := m["spin"]
		if !ok {
			d.badErr(path+".spin", ErrMissing, "missing; the spin preset needs the spin s, e.g. spin: 1 or spin: \"3/2\"")
			return
		}
		twoS, err := parseSpin(v)
		if err != nil {
			d.bad(path+".spin", "%v", err)
			return
		}
		s.Scheme = holonomy.Spin(twoS, 0, 1)
	default:
		d.bad(path+".preset", "unknown preset %q; presets are tripod, lambda, spin-1/2, spin", preset)
		return
	}
	s.Preset = preset
	sc := s.Scheme
	if det := mapAt(m, "detuning"); det != nil {
		for _, name := range sortedKeys(det) {
			p := path + ".detuning." + name
			k := levelIndex(sc, name)
			if k < 0 {
				d.bad(p, "no level %q in the %s preset; its levels are %s", name, preset, levelNames(sc))
				continue
			}
			if x, ok := d.quantityValue(det[name], p, Frequency); ok {
				sc.Levels[k].Detuning = 2 * math.Pi * x
			}
		}
	}
	if dec := mapAt(m, "decay"); dec != nil {
		for _, name := range sortedKeys(dec) {
			p := path + ".decay." + name
			k := levelIndex(sc, name)
			if k < 0 {
				d.bad(p, "no level %q in the %s preset; its levels are %s", name, preset, levelNames(sc))
				continue
			}
			if x, ok := d.quantityValue(dec[name], p, Rate); ok {
				sc.Levels[k].Decay = x
			}
		}
	}
}

// parseSpin reads s as "1/2", "1", "3/2", 0.5, 1, ... and returns 2s.
func parseSpin(v any) (int, error) {
	var twoS float64
	switch x := v.(type) {
	case string:
		t := strings.ReplaceAll(x, " ", "")
		if num, ok := strings.CutSuffix(t, "/2"); ok {
			n, err := strconv.Atoi(num)
			if err != nil {
				return 0, fmt.Errorf("%q is not a spin; expected 1/2, 1, 3/2, ... up to 15/2", x)
			}
			twoS = float64(n)
		} else {
			n, err := strconv.Atoi(t)
			if err != nil {
				return 0, fmt.Errorf("%q is not a spin; expected 1/2, 1, 3/2, ... up to 15/2", x)
			}
			twoS = 2 * float64(n)
		}
	default:
		f, ok := toFloat(v)
		if !ok {
			return 0, fmt.Errorf("expected a spin such as 1/2, 1, 3/2; found %s", describeValue(v))
		}
		twoS = 2 * f
	}
	if twoS != math.Trunc(twoS) || twoS < 1 || twoS > holonomy.MaxLevels-1 {
		return 0, fmt.Errorf("spin %v is not one of 1/2, 1, 3/2, ..., 15/2 (a ladder of 2 to %d levels)", twoS/2, holonomy.MaxLevels)
	}
	return int(twoS), nil
}

func (d *decoder) graph(s *Spec, m map[string]any, path string, hasLevels, hasChannels bool) {
	if !hasLevels {
		d.bad(path+".levels", "missing; an explicit coupling graph needs levels and channels")
		return
	}
	if !hasChannels {
		d.bad(path+".channels", "missing; an explicit coupling graph needs levels and channels")
		return
	}
	for _, k := range []string{"detuning", "decay", "spin"} {
		if _, ok := m[k]; ok {
			d.bad(path+"."+k, "only used with a preset; in an explicit coupling graph give detuning and decay in each level's entry")
		}
	}
	sc := &holonomy.Scheme{Name: "custom"}
	if name, ok := m["name"].(string); ok && name != "" {
		sc.Name = name
	}
	levels, _ := m["levels"].([]any)
	first := map[string]int{}
	for i, v := range levels {
		lm, _ := v.(map[string]any)
		p := fmt.Sprintf("%s.levels[%d]", path, i)
		name, _ := lm["name"].(string)
		if j, dup := first[name]; dup {
			d.bad(p+".name", "level name %q is used twice (also %s.levels[%d])", name, path, j)
		}
		first[name] = i
		l := holonomy.Level{Name: name}
		if x, ok := d.quantity(lm, "detuning", p, Frequency); ok {
			l.Detuning = 2 * math.Pi * x
		}
		if x, ok := d.quantity(lm, "decay", p, Rate); ok {
			l.Decay = x
		}
		sc.Levels = append(sc.Levels, l)
	}
	chans, _ := m["channels"].([]any)
	firstC := map[string]int{}
	for i, v := range chans {
		cm, _ := v.(map[string]any)
		p := fmt.Sprintf("%s.channels[%d]", path, i)
		name, _ := cm["name"].(string)
		if j, dup := firstC[name]; dup {
			d.bad(p+".name", "channel name %q is used twice (also %s.channels[%d])", name, path, j)
		}
		firstC[name] = i
		c := holonomy.Channel{Name: name, Lower: -1, Upper: -1, Factor: 1}
		for _, end := range []string{"lower", "upper"} {
			ln, _ := cm[end].(string)
			k := levelIndex(sc, ln)
			if k < 0 {
				d.bad(p+"."+end, "channel %q names level %q, which does not exist; levels are %s", name, ln, levelNames(sc))
				continue
			}
			if end == "lower" {
				c.Lower = k
			} else {
				c.Upper = k
			}
		}
		if f, ok := cm["factor"]; ok {
			x, ok := toFloat(f)
			if !ok {
				d.bad(p+".factor", "expected a number; found %s", describeValue(f))
			}
			c.Factor = x
		}
		sc.Channels = append(sc.Channels, c)
	}
	s.Scheme = sc
}
