package plots

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
)

// maxLabels is the most labelled ticks an axis gets; wider logarithmic
// ranges label every second, fifth, tenth … decade instead.
const maxLabels = 10

// LogTicks marks a logarithmic axis. Labelled ticks sit on powers of ten,
// written 10ⁿ (as "10^n" for superText, with a true minus sign), with
// minor ticks at 2…9 × 10ⁿ between them; over more than maxLabels decades
// only every second, fifth, tenth … decade is labelled, and the others
// carry minor ticks. A range that holds fewer than two powers of ten is
// labelled at 1, 2 and 5 × 10ⁿ (or at every digit) with short decimals, so
// that every axis has at least two labels. Tick values are computed from
// integer exponents, never by repeated multiplication, so no label carries
// a rounding tail such as 9.999999999999999e-05.
type LogTicks struct{}

// Ticks returns the ticks between min and max (both positive).
func (LogTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0) || !(max >= min) || math.IsInf(max, 0) {
		panic(fmt.Sprintf("plots: LogTicks on the range [%g, %g]", min, max))
	}
	// A hair of slack so that a range ending exactly on 10ⁿ (after
	// rounding of the data) keeps that label.
	lo := int(math.Ceil(math.Log10(min) - 1e-9))
	hi := int(math.Floor(math.Log10(max) + 1e-9))
	if hi-lo+1 >= 2 {
		return decadeTicks(min, max, lo, hi)
	}
	for _, mantissas := range [][]int{{1, 2, 5}, {1, 2, 3, 4, 5, 6, 7, 8, 9}} {
		if t := mantissaTicks(min, max, mantissas); countLabels(t) >= 2 {
			return t
		}
	}
	// Less than one digit step wide (e.g. 0.95 to 1): decimal ticks.
	return LinearTicks{}.Ticks(min, max)
}

// decadeTicks labels every step-th power of ten from 10^lo to 10^hi and
// puts minor ticks between.
func decadeTicks(min, max float64, lo, hi int) []plot.Tick {
	step := 1
	for _, s := range []int{1, 2, 5, 10, 20, 50, 100} {
		step = s
		if (floorDiv(hi, s)-ceilDiv(lo, s))+1 <= maxLabels {
			break
		}
	}
	var ticks []plot.Tick
	for n := lo - 1; n <= hi; n++ {
		v := math.Pow10(n)
		if v >= min*(1-1e-9) && n%step == 0 {
			ticks = append(ticks, plot.Tick{Value: v, Label: powerLabel(n)})
		} else if v >= min*(1-1e-9) {
			ticks = append(ticks, plot.Tick{Value: v})
		}
		if step > 1 {
			continue
		}
		for m := 2; m <= 9; m++ {
			if w := float64(m) * v; w >= min && w <= max {
				ticks = append(ticks, plot.Tick{Value: w})
			}
		}
	}
	return ticks
}

// mantissaTicks labels m × 10ⁿ for the given mantissas m inside [min,
// max], with minor ticks at the other digits.
func mantissaTicks(min, max float64, mantissas []int) []plot.Tick {
	var ticks []plot.Tick
	for n := int(math.Floor(math.Log10(min))); n <= int(math.Ceil(math.Log10(max))); n++ {
		for m := 1; m <= 9; m++ {
			v := float64(m) * math.Pow10(n)
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			for _, k := range mantissas {
				if k == m {
					t.Label = mantissaLabel(m, n)
				}
			}
			ticks = append(ticks, t)
		}
	}
	return ticks
}

// countLabels returns the number of labelled ticks.
func countLabels(ticks []plot.Tick) int {
	n := 0
	for _, t := range ticks {
		if t.Label != "" {
			n++
		}
	}
	return n
}

// powerLabel writes 10ⁿ for superText.
func powerLabel(n int) string { return "10^" + minus(strconv.Itoa(n)) }

// minus replaces a leading hyphen by the minus sign U+2212.
func minus(s string) string {
	if strings.HasPrefix(s, "-") {
		return "−" + s[1:]
	}
	return s
}

// mantissaLabel writes m × 10ⁿ: a short decimal for 10⁻³ ≤ m × 10ⁿ < 10⁵,
// m × 10ⁿ in powers otherwise.
func mantissaLabel(m, n int) string {
	if n >= -3 && n <= 4 {
		return strconv.FormatFloat(float64(m)*math.Pow10(n), 'f', max(0, -n), 64)
	}
	if m == 1 {
		return powerLabel(n)
	}
	return strconv.Itoa(m) + "×" + powerLabel(n)
}

// LinearTicks marks a linear axis: labels at the multiples of a step of
// 1, 2, 2.5 or 5 × 10ⁿ chosen for about targetLabels of them (never more
// than maxLabels), minor ticks between, and each label written from its
// integer multiple with the decimals the step needs and no more, so that
// 0.30000000000000004 reads 0.3 and −0 reads 0.
type LinearTicks struct{}

// targetLabels is the number of labels LinearTicks aims at.
const targetLabels = 5

// Ticks returns the ticks between min and max.
func (LinearTicks) Ticks(vmin, vmax float64) []plot.Tick {
	if !(vmax > vmin) {
		// A flat range (a single value): one labelled tick on it.
		return []plot.Tick{{Value: vmin, Label: valueLabel(vmin)}}
	}
	span := vmax - vmin
	mag := math.Pow10(int(math.Floor(math.Log10(span / targetLabels))))
	var step float64
	var minors, decimals int
	for _, c := range []struct {
		m      float64
		minors int // minor intervals per step
		extra  int // decimals beyond the magnitude's
	}{{1, 5, 0}, {2, 4, 0}, {2.5, 5, 1}, {5, 5, 0}, {10, 5, 0}} {
		step, minors = c.m*mag, c.minors
		decimals = max(0, -int(math.Floor(math.Log10(mag)))+c.extra)
		if c.m == 10 {
			decimals = max(0, decimals-1)
		}
		if span/step <= maxLabels-1 && math.Floor(vmax/step+1e-9)-math.Ceil(vmin/step-1e-9) <= targetLabels+1 {
			break
		}
	}
	var ticks []plot.Tick
	lo, hi := int(math.Ceil(vmin/step-1e-9)), int(math.Floor(vmax/step+1e-9))
	for k := lo - 1; k <= hi; k++ {
		v := float64(k) * step
		if k >= lo {
			ticks = append(ticks, plot.Tick{Value: v, Label: decimalLabel(v, decimals)})
		}
		for j := 1; j < minors; j++ {
			if w := v + float64(j)*step/float64(minors); w >= vmin && w <= vmax {
				ticks = append(ticks, plot.Tick{Value: w})
			}
		}
	}
	return ticks
}

// maxDecimals is the most decimals a linear tick label gets; finer
// spacings are written m×10ⁿ.
const maxDecimals = 4

// decimalLabel formats v with the given decimals and without a negative
// zero; in powers of ten, m×10ⁿ, where that would take more than
// maxDecimals or v is 10⁷ or more.
func decimalLabel(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', min(decimals, 12), 64)
	if strings.Trim(s, "-0.") == "" {
		return "0"
	}
	if a := math.Abs(v); a >= 1e7 || decimals > maxDecimals {
		n := int(math.Floor(math.Log10(a)))
		m := strconv.FormatFloat(v/math.Pow10(n), 'g', 3, 64)
		if m == "1" {
			return powerLabel(n)
		}
		if m == "-1" {
			return "−" + powerLabel(n)
		}
		return minus(m) + "×" + powerLabel(n)
	}
	return minus(s)
}

// floorDiv and ceilDiv divide rounding towards −∞ and +∞.
func floorDiv(a, b int) int { return int(math.Floor(float64(a) / float64(b))) }
func ceilDiv(a, b int) int  { return int(math.Ceil(float64(a) / float64(b))) }

// logCoordTicks marks an axis whose coordinates are log10 of the values
// with LogTicks of the values.
type logCoordTicks struct{}

func (logCoordTicks) Ticks(min, max float64) []plot.Tick {
	ticks := LogTicks{}.Ticks(math.Pow(10, min), math.Pow(10, max))
	for i := range ticks {
		ticks[i].Value = math.Log10(ticks[i].Value)
	}
	return ticks
}
