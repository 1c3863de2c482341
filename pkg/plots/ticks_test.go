package plots

import (
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot"
)

// cleanLabel is what a tick label may look like: a decimal with at most
// maxDecimals digits after the point, 10ⁿ, or m×10ⁿ with a mantissa of at
// most three significant digits — never a rounding tail.
var cleanLabel = regexp.MustCompile(`^(−?\d{1,7}(\.\d{1,4})?|(−?\d(\.\d{1,2})?×)?10\^−?\d{1,3})$`)

// labelValue reads a label back: the number it says.
func labelValue(t *testing.T, s string) float64 {
	t.Helper()
	s = strings.ReplaceAll(s, "−", "-")
	m := 1.0
	if a, b, ok := strings.Cut(s, "×"); ok {
		var err error
		if m, err = strconv.ParseFloat(a, 64); err != nil {
			t.Fatalf("label %q: %v", s, err)
		}
		s = b
	}
	if e, ok := strings.CutPrefix(s, "10^"); ok {
		n, err := strconv.Atoi(e)
		if err != nil {
			t.Fatalf("label %q: %v", s, err)
		}
		return m * math.Pow10(n)
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("label %q: %v", s, err)
	}
	return m * v
}

// labels returns the labelled ticks.
func labels(ticks []plot.Tick) []plot.Tick {
	var out []plot.Tick
	for _, t := range ticks {
		if t.Label != "" {
			out = append(out, t)
		}
	}
	return out
}

// From 10⁻⁵ to 10³ the labels are exactly the nine powers of ten, each
// tick value the correctly rounded 10ⁿ (math.Pow10 is exact to the last
// bit; repeated multiplication by 10, as gonum's LogTicks does, is not).
func TestLogTicksPowers(t *testing.T) {
	got := labels(LogTicks{}.Ticks(1e-5, 1e3))
	if len(got) != 9 {
		t.Fatalf("%d labels, want 9: %v", len(got), got)
	}
	for i, tk := range got {
		n := i - 5
		want := "10^" + strings.ReplaceAll(strconv.Itoa(n), "-", "−")
		if tk.Label != want || tk.Value != math.Pow10(n) {
			t.Errorf("label %d: %q at %v, want %q at %v", i, tk.Label, tk.Value, want, math.Pow10(n))
		}
	}
	// Minor ticks at 2…9 × 10ⁿ: 8 per decade over 8 decades.
	if minor := len(LogTicks{}.Ticks(1e-5, 1e3)) - 9; minor != 8*8 {
		t.Errorf("%d minor ticks, want 64", minor)
	}
}

// Awkward ranges: every label is clean (cleanLabel), says the value of its
// tick, lies in the range, and every axis has at least two labels.
func TestTicksClean(t *testing.T) {
	// relTol: a label of at most three significant digits rounds a tick
	// value by at most half a unit in its last place; the tick values
	// here are exact multiples, so 1e-9 leaves room for float rounding
	// only.
	const relTol = 1e-9
	for _, tc := range []struct {
		name     string
		ticker   plot.Ticker
		min, max float64
	}{
		{"log 9 decades", LogTicks{}, 1e-5, 1e3},
		{"log falloff ratio", LogTicks{}, 0.0123, 0.987},
		{"log under a decade", LogTicks{}, 0.3, 0.9},
		{"log narrow", LogTicks{}, 0.95, 1.0},
		{"log between powers", LogTicks{}, 2.3e-7, 8.7e-6},
		{"log 30 decades", LogTicks{}, 3.3e-21, 7.1e9},
		{"log rate constants", LogTicks{}, 1.39e-3, 4.7e13},
		{"log huge", LogTicks{}, 6.02e23, 3e26},
		{"log tiny", LogTicks{}, 1.2e-300, 5e-290},
		{"linear unit", LinearTicks{}, 0, 1},
		{"linear 1000/T", LinearTicks{}, 0.4, 3.3333333333333335},
		{"linear thirds", LinearTicks{}, 0.1, 0.7000000000000001},
		{"linear signed", LinearTicks{}, -0.03, 0.02},
		{"linear temperatures", LinearTicks{}, 299.99, 2500.01},
		{"linear energies", LinearTicks{}, 12345.6, 98765.4},
		{"linear tiny", LinearTicks{}, 1e-9, 3.3e-9},
		{"linear large", LinearTicks{}, 2e8, 9e8},
		{"linear flat", LinearTicks{}, 0.5, 0.5},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ls := labels(tc.ticker.Ticks(tc.min, tc.max))
			if (len(ls) < 2 && tc.min != tc.max) || len(ls) > maxLabels {
				t.Errorf("%d labels: %v", len(ls), ls)
			}
			if _, lin := tc.ticker.(LinearTicks); lin && len(ls) > 2 {
				// Labels on the multiples of one step.
				d := ls[1].Value - ls[0].Value
				for i := 2; i < len(ls); i++ {
					if math.Abs(ls[i].Value-ls[i-1].Value-d) > 1e-9*d {
						t.Errorf("labels unevenly spaced: %v", ls)
					}
				}
				if r := ls[0].Value / d; math.Abs(r-math.Round(r)) > 1e-9 {
					t.Errorf("first label %v not a multiple of the step %v", ls[0].Value, d)
				}
			}
			for _, tk := range ls {
				if !cleanLabel.MatchString(tk.Label) {
					t.Errorf("label %q at %v is not clean", tk.Label, tk.Value)
					continue
				}
				v := labelValue(t, tk.Label)
				if math.Abs(v-tk.Value) > relTol*math.Max(math.Abs(tk.Value), math.Abs(tc.max-tc.min)) {
					t.Errorf("label %q says %v, tick at %v", tk.Label, v, tk.Value)
				}
				span := tc.max - tc.min
				if tk.Value < tc.min-1e-9*span || tk.Value > tc.max+1e-9*span {
					t.Errorf("label %q at %v outside [%v, %v]", tk.Label, tk.Value, tc.min, tc.max)
				}
			}
		})
	}
}

// A log range wider than maxLabels decades labels every second, fifth, …
// decade, never more than maxLabels of them, on multiples of the step.
func TestLogTicksThinned(t *testing.T) {
	for _, tc := range []struct {
		lo, hi, step int
	}{{-5, 5, 1}, {-10, 10, 5}, {-3, 12, 2}, {-20, 30, 10}, {-100, 100, 50}} {
		ls := labels(LogTicks{}.Ticks(math.Pow10(tc.lo), math.Pow10(tc.hi)))
		if len(ls) > maxLabels {
			t.Errorf("10^%d…10^%d: %d labels", tc.lo, tc.hi, len(ls))
		}
		for _, tk := range ls {
			n := int(math.Round(math.Log10(tk.Value)))
			if n%tc.step != 0 || tk.Value != math.Pow10(n) {
				t.Errorf("10^%d…10^%d: label %q at %v, want multiples of %d decades", tc.lo, tc.hi, tk.Label, tk.Value, tc.step)
			}
		}
	}
}
