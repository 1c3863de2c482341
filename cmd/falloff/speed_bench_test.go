package main

import (
	"strconv"
	"strings"
	"syscall"
	"testing"
)

// speedCases are the end-to-end cases of the speed benchmark (issue 21): a
// 12-mode molecule (methyl isocyanide-like) and an invented 84-mode one, each
// on 30 temperatures × 20 pressures with four fitted forms.
var speedCases = []struct{ name, file string }{
	{"12-mode", "../../testdata/bench/ch3nc-12mode.yaml"},
	{"84-mode", "../../testdata/bench/invented-84mode.yaml"},
}

// cpuSeconds returns the CPU time (user + system) the process has used.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	tv := func(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }
	return tv(ru.Utime) + tv(ru.Stime)
}

// BenchmarkRatesEndToEnd times the whole `rates` job as a user runs it —
// master equation with its convergence check and held-out points, fits,
// mechanism files, figures and summary — on one worker and on two, and
// reports the CPU time per run (cpu-s/op) and, on two workers, the parallel
// speed-up in wall time over one worker measured in the same run
// (speedup-vs-1).
func BenchmarkRatesEndToEnd(b *testing.B) {
	for _, c := range speedCases {
		var one float64 // wall seconds per run on one worker
		for _, jobs := range []int{1, 2} {
			b.Run(c.name+"/jobs="+strconv.Itoa(jobs), func(b *testing.B) {
				dir := b.TempDir()
				args := []string{"rates", "-q", "--jobs", strconv.Itoa(jobs), "--out", dir, "--plots", dir, c.file}
				cpu0 := cpuSeconds()
				for b.Loop() {
					var out, errb strings.Builder
					if code := run(args, strings.NewReader(""), &out, &errb); code != exitOK {
						b.Fatalf("exit %d: %s", code, errb.String())
					}
				}
				wall := b.Elapsed().Seconds() / float64(b.N)
				b.ReportMetric((cpuSeconds()-cpu0)/float64(b.N), "cpu-s/op")
				if jobs == 1 {
					one = wall
				} else if one > 0 {
					b.ReportMetric(one/wall, "speedup-vs-1")
				}
			})
		}
	}
}
