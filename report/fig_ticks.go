package report

import (
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
)

// Tick generators. Every label is the exact decimal of its tick's value:
// ticks sit at whole multiples of a step of 1, 2, 2.5 or 5 x 10^k, and the
// label carries as many decimals as the step needs (two for 0.25, one for
// 0.5, none for 25).
//
// The figures do not use gonum's default generator (plot.DefaultTicks,
// v0.17): its search may start the labels at an offset from the step's
// multiples (1.05, 1.25, 1.45, 1.65 for a step of 0.2 on 1.001..1.653) but
// it picks the decimals from the step alone, so those labels print as
// "1.1", "1.2", "1.5", "1.7" at evenly spaced ticks.
// TestAxisCheckOnTheOldDefect keeps that case.

// maxTicks is the most labelled ticks on one axis (our choice: enough to
// read a value, few enough to stay apart at 8 pt on a 40 mm axis).
const maxTicks = 6

// niceStep returns the smallest step m x 10^e (m in 1, 2, 2.5, 5) that
// puts at most maxTicks whole multiples in [min, max], and the number of
// decimals its multiples need.
func niceStep(min, max float64) (step float64, decimals int) {
	return niceStepN(min, max, maxTicks)
}

// niceStepN is niceStep with at most n ticks (n >= 2). It ends for any
// finite min <= max: the first exponent is clamped to the doubles' decimal
// range (a span that overflows, or is 0, gave an exponent of the int's
// minimum and a loop without end), and past 10^308 it gives that step.
func niceStepN(min, max float64, n int) (step float64, decimals int) {
	lg := math.Log10(max/2-min/2) + math.Log10(2/float64(n)) // the span without overflow
	e := -324
	if lg > -324 { // false for NaN and -Inf
		e = int(math.Floor(math.Min(lg, 308)))
	}
	for ; e <= 308; e++ {
		for _, m := range []float64{1, 2, 2.5, 5} {
			step = m * math.Pow10(e)
			k := math.Floor(max/step+1e-9) - math.Ceil(min/step-1e-9) + 1
			if k <= float64(n) {
				decimals = -e
				if m == 2.5 {
					decimals++
				}
				return step, maxInt(decimals, 0)
			}
		}
	}
	return 1e308, 0
}

func maxInt(a, b int) int {
	if a > b {
		return a
	}
	return b
}

// multiples returns the whole multiples of step in [min, max]. A step
// below 1 is divided out of a power of ten, so each value is the double
// nearest its decimal (0.3, not 0.30000000000000004).
func multiples(min, max, step float64) []float64 {
	e := math.Floor(math.Log10(step) + 1e-9)
	var vs []float64
	for k := math.Ceil(min/step - 1e-9); k*step <= max+step*1e-9; k++ {
		v := k * step
		if e < 0 {
			v = math.Round(k*step*math.Pow10(int(-e+1))) / math.Pow10(int(-e+1))
		}
		if math.Abs(v) < step*1e-9 {
			v = 0
		}
		vs = append(vs, v)
	}
	return vs
}

// fmtTick writes v with dec decimals and a true minus sign.
func fmtTick(v float64, dec int) string {
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return strings.Replace(s, "-", "\u2212", 1)
}

// niceTicks labels a linear axis at whole multiples of a nice step, with
// at most N labels (maxTicks when N is 0).
type niceTicks struct{ N int }

// Ticks implements plot.Ticker.
func (t niceTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) {
		return []plot.Tick{{Value: min, Label: fmtTick(min, 2)}}
	}
	n := t.N
	if n < 2 {
		n = maxTicks
	}
	step, dec := niceStepN(min, max, n)
	var ts []plot.Tick
	for _, v := range multiples(min, max, step) {
		ts = append(ts, plot.Tick{Value: v, Label: fmtTick(v, dec)})
	}
	return ts
}

// logTicks labels a log axis at 1, 2 and 5 x 10^k, with unlabelled minor
// ticks at the other whole multiples; a range too narrow for two such
// labels falls back to niceTicks (narrow). With an axis length W (points) and
// label size Pt set, a label is dropped where it would come within 3 pt
// of a neighbouring label (labels centred on their ticks): powers of ten
// are placed first, from the smallest up, then 2 and 5 x 10^k, so crowded
// labels never touch.
type logTicks struct {
	W  vg.Length
	Pt float64
}

// Ticks implements plot.Ticker.
func (lt logTicks) Ticks(min, max float64) []plot.Tick {
	if min <= 0 || !(max > min) {
		return niceTicks{}.Ticks(min, max)
	}
	var ts []plot.Tick
	labelled := 0
	for e := int(math.Floor(math.Log10(min))); e <= int(math.Ceil(math.Log10(max))); e++ {
		for m := 1; m <= 9; m++ {
			v := float64(m) * math.Pow10(e)
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || m == 2 || m == 5 {
				t.Label = fmtTick(v, maxInt(-e, 0))
				labelled++
			}
			ts = append(ts, t)
		}
	}
	if labelled < 2 {
		return lt.narrow(min, max)
	}
	if lt.W > 0 {
		lt.spread(ts, min, max)
	}
	return ts
}

// narrow labels a log axis too narrow for two 1, 2 or 5 x 10^k labels
// (one extent's area, padded by 1.25 on each side) at multiples of a nice
// step, as niceTicks; with an axis length set, with the most labels (at
// most maxTicks, at least two) that keep 3 pt apart on the log scale:
// six labels of four digits on a 125 pt axis (2750 to 4000) touched.
func (lt logTicks) narrow(min, max float64) []plot.Tick {
	ts := niceTicks{}.Ticks(min, max)
	for n := maxTicks - 1; n >= 2 && lt.W > 0 && !lt.apart(ts, min, max); n-- {
		fewer := niceTicks{N: n}.Ticks(min, max)
		if len(fewer) < 2 {
			break // a step that leaves one label: keep two that crowd
		}
		ts = fewer
	}
	return ts
}

// apart reports whether every two neighbouring labels of ts (ticks from
// min to max on a log axis of length lt.W) keep 3 pt apart.
func (lt logTicks) apart(ts []plot.Tick, min, max float64) bool {
	x := func(v float64) vg.Length { return vg.Length(math.Log10(v/min)/math.Log10(max/min)) * lt.W }
	for i := 1; i < len(ts); i++ {
		gap := x(ts[i].Value) - x(ts[i-1].Value)
		if gap < (textWidth(ts[i-1].Label, lt.Pt)+textWidth(ts[i].Label, lt.Pt))/2+vg.Points(3) {
			return false
		}
	}
	return true
}

// spread drops the labels of ts (ticks from min to max) that would crowd
// their neighbours on an axis of length lt.W: powers of ten are kept
// while they keep 3 pt apart, then each 2 and 5 x 10^k, in order, only if
// it keeps 3 pt from the nearest kept label on each side.
func (lt logTicks) spread(ts []plot.Tick, min, max float64) {
	x := func(v float64) vg.Length { return vg.Length(math.Log10(v/min)/math.Log10(max/min)) * lt.W }
	half := func(t plot.Tick) vg.Length { return textWidth(t.Label, lt.Pt) / 2 }
	isDecade := func(v float64) bool { return v == math.Pow10(int(math.Round(math.Log10(v)))) }
	apart := func(i, j int) bool { // labels i < j far enough apart
		return x(ts[j].Value)-x(ts[i].Value) >= half(ts[i])+half(ts[j])+vg.Points(3)
	}
	// Powers of ten from the smallest up, each kept if it keeps 3 pt from
	// the last one kept: on a range of six decades or more ("1" to
	// "100000" in 1000 km² on a 150 pt panel) neighbouring powers of ten
	// touched, and were all drawn.
	kept := make([]bool, len(ts))
	last := -1
	for i, t := range ts {
		if t.Label != "" && isDecade(t.Value) && (last < 0 || apart(last, i)) {
			kept[i], last = true, i
		}
	}
	for i, t := range ts {
		if t.Label == "" || kept[i] {
			continue
		}
		ok := true
		for j := i - 1; j >= 0 && ok; j-- {
			if kept[j] {
				ok = apart(j, i)
				break
			}
		}
		for j := i + 1; j < len(ts) && ok; j++ {
			if kept[j] {
				ok = apart(i, j)
				break
			}
		}
		kept[i] = ok
	}
	for i := range ts {
		if !kept[i] {
			ts[i].Label = ""
		}
	}
}

// degreeTicks labels longitude (Lon) or latitude with hemisphere letters:
// 150°W, 0°, 30°S. With H, the axis's length, set (a latitude axis, whose
// labels stack), labels of size minFontPt closer than 1.2 times their
// height are thinned: every k-th is kept, the one nearest the middle
// alone on an axis too short for two (a map of a strip a few cells tall,
// whose labels were drawn over each other).
type degreeTicks struct {
	Lon bool
	H   vg.Length
}

// Ticks implements plot.Ticker.
func (d degreeTicks) Ticks(min, max float64) []plot.Tick {
	ts := niceTicks{}.Ticks(min, max)
	for i := range ts {
		ts[i].Label = degreeLabel(ts[i].Value, ts[i].Label, d.Lon)
	}
	if d.H > 0 && len(ts) > 1 && max > min {
		gap := float64(d.H) * (ts[1].Value - ts[0].Value) / (max - min) // points between ticks
		need := 1.2 * minFontPt
		if k := int(math.Ceil(need / gap)); k > 1 {
			if float64(d.H) < 2*need {
				// One label: the tick nearest the middle.
				mid, best := (min+max)/2, 0
				for i, t := range ts {
					if math.Abs(t.Value-mid) < math.Abs(ts[best].Value-mid) {
						best = i
					}
				}
				k, ts = 1, []plot.Tick{ts[best]}
			}
			for i := range ts {
				if i%k != 0 {
					ts[i].Label = ""
				}
			}
		}
	}
	return ts
}

// degreeLabel labels the tick at v (label: its number as niceTicks wrote
// it). A longitude past ±180° (a grid across the antimeridian, 170°E to
// 200°E) is named as the meridian it is, 200 as 160°W, with the decimals
// of label; 180 is "180°", neither east nor west.
func degreeLabel(v float64, label string, lon bool) string {
	label = strings.TrimPrefix(label, "\u2212")
	if lon && (v > 180 || v <= -180) {
		decimals := 0
		if i := strings.IndexByte(label, '.'); i >= 0 {
			decimals = len(label) - i - 1
		}
		v = math.Mod(v+180, 360)
		if v < 0 {
			v += 360
		}
		v -= 180 // now in [-180, 180)
		if v == -180 {
			v = 180
		}
		label = strconv.FormatFloat(math.Abs(v), 'f', decimals, 64)
	}
	if lon && math.Abs(v) == 180 {
		return label + "°"
	}
	switch {
	case v == 0:
		return label + "°"
	case lon && v < 0:
		return label + "°W"
	case lon:
		return label + "°E"
	case v < 0:
		return label + "°S"
	}
	return label + "°N"
}
