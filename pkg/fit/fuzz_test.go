package fit

import (
	"bytes"
	"errors"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzReadCSV checks ReadCSV on arbitrary bytes and file names: it never
// panics; an error is a *CSVError naming the file given, with a one-line
// message; an accepted table has at least three rows, units for k, and
// positive, finite T, P and k, a finite non-negative uncertainty, and,
// without uncertainties, replicates (the same T and P) within a factor
// replicateMaxRatio of each other.
func FuzzReadCSV(f *testing.F) {
	paths, err := filepath.Glob("testdata/*.csv")
	if err != nil || len(paths) == 0 {
		f.Fatalf("seed files testdata/*.csv: %v (found %d)", err, len(paths))
	}
	for _, path := range paths {
		data, err := os.ReadFile(path)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(filepath.Base(path), data)
	}
	for _, s := range []string{
		"T/K,P/atm,k/s-1\n300,1,2.5e3\n400,1,3e3\n500,2,4e3\n",
		"# generated\nT/K,P/Torr,k/cm3/mol/s\n# a comment\n300,760,1e13\n400,760,2e13\n\n500,76,3e13\n",
		"k [cm3 mol-1 s-1], T [K], P (bar)\n 1e12, 300, 1\n2e12,400,1\n3e12,500,1\n",
		"T/K,P/kPa,k/s-1,sigma\n300,100,1,0.1\n400,100,2,0.2\n500,100,3,0.1\n",
		"T/K,P/hPa,k/s-1,uncertainty/%\n300,1000,1,10\n400,1000,2,20\n500,1000,3,1e-320\n",
		"T/K,P/atm,k/s-1\r\n300,1,1\r\n400,1,2\r\n500,1,3\r\n",
		"\ufeffT/K,P/atm,k/s-1\n300,1,1\n400,1,2\n500,1,3\n",
		"T/K,P/atm,k/s-1\n300,1e308,1\n400,1,2\n500,1,3\n",
		"T/K,P/atm,k/s-1\n300,1,NaN\n400,1,Inf\n500,1,1e400\n",
		"T/K,P/atm,k/s-1\n300,1,1\n300,1,2\n500,1,3\n",
		"T/K,P/atm,k/s-1\n300,1,1 s-1\n",
		"T/K,P/atm,k/s-1\n300,1\n",
		"\"T\n/K\",P/atm,k/s-1\nx,1,1\n",
		"T/K,\"P/atm,k/s-1\n300,1,1\n",
		"T/°C,P/atm,k/s-1\n",
		"T/K,P/bar,P/atm,k/s-1\n",
		"T/K;P/atm;k/s-1\n300;1;1\n",
		"300,1,1\n",
		"#only a comment\n",
		"",
	} {
		f.Add("in.csv", []byte(s))
	}

	f.Fuzz(func(t *testing.T, name string, data []byte) {
		tab, err := ReadCSV(name, bytes.NewReader(data))
		if err != nil {
			if tab != nil {
				t.Errorf("ReadCSV returned a table and the error %v", err)
			}
			var ce *CSVError
			if !errors.As(err, &ce) {
				t.Fatalf("error %q is a %T, not a *CSVError", err, err)
			}
			if ce.File != name || ce.Err == nil {
				t.Errorf("CSVError File %q, Err %v; want the name given, %q, and a cause", ce.File, ce.Err, name)
			}
			// The message writes the file name as given, so only a name
			// without a line break can give a one-line message.
			if msg := err.Error(); !strings.ContainsAny(name, "\r\n") && (msg == "" || strings.ContainsAny(msg, "\r\n")) {
				t.Errorf("error message is empty or not one line: %q", msg)
			}
			// Nothing from the table reaches the terminal raw, and no cell
			// is echoed whole beyond a few hundred bytes.
			if msg := err.Error(); strings.ContainsFunc(msg, escape.NotPrintable) ||
				len(msg) > 1000+6*len(name) {
				t.Errorf("error message holds a raw control character or is %d bytes long: %.300q", len(msg), msg)
			}
			return
		}
		if strings.ContainsFunc(tab.KUnits, escape.NotPrintable) || len(tab.KUnits) > maxHeaderLen {
			t.Errorf("k units %q accepted: printed in reports and mechanism files", tab.KUnits)
		}
		if tab.Name != name || strings.TrimSpace(tab.KUnits) == "" || len(tab.Points) < minCSVRows {
			t.Errorf("table %q, k units %q, %d points: want the name given, units and at least %d points",
				tab.Name, tab.KUnits, len(tab.Points), minCSVRows)
		}
		type key struct{ T, P float64 }
		seen := map[key]float64{}
		for i, p := range tab.Points {
			if !positiveFinite(p.T) || !positiveFinite(p.P) || !positiveFinite(p.K) ||
				!(p.Sigma >= 0) || math.IsInf(p.Sigma, 0) {
				t.Errorf("point %d = %+v: want T, P, k positive and finite, sigma finite and ≥ 0", i, p)
			}
			if k, ok := seen[key{p.T, p.P}]; ok && !tab.Weighted() && math.Max(k/p.K, p.K/k) > replicateMaxRatio {
				t.Errorf("point %d = %+v: a replicate more than %g from k = %g", i, p, replicateMaxRatio, k)
			}
			seen[key{p.T, p.P}] = p.K
		}
	})
}

func positiveFinite(x float64) bool { return x > 0 && !math.IsInf(x, 0) }
