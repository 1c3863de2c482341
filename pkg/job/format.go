package job

import (
	"fmt"
	"math"
	"strconv"
)

// num formats a number with 4 significant digits, as in messages.
func num(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// byteSize writes a number of bytes in decimal units: "400 MB", "1.09 GB".
func byteSize(b float64) string {
	if math.IsInf(b, 0) || math.IsNaN(b) {
		return "more than any memory"
	}
	names := []string{"B", "kB", "MB", "GB", "TB", "PB", "EB"}
	i := 0
	for b >= 1000 && i < len(names)-1 {
		b /= 1000
		i++
	}
	return fmt.Sprintf("%.3g %s", b, names[i])
}

// roundUp rounds x up to digits significant digits, for hints.
func roundUp(x float64, digits int) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return x
	}
	p := math.Pow(10, float64(digits)-math.Ceil(math.Log10(x)))
	return math.Ceil(x*p) / p
}
