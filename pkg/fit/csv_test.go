package fit

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

var update = flag.Bool("update", false, "update the generated tables in testdata")

func TestReadCSVGood(t *testing.T) {
	for _, c := range []struct {
		name   string
		in     string
		kUnits string
		first  Point
		n      int
	}{
		{"atm", "T/K,P/atm,k/s-1\n300,1,2.5e3\n400,1,3e3\n500,2,4e3\n", "s-1", Point{T: 300, P: units.AtmPa, K: 2.5e3}, 3},
		{"Torr and comments", "# generated\nT/K,P/Torr,k/cm3/mol/s\n# a comment\n300,760,1e13\n400,760,2e13\n\n500,76,3e13\n", "cm3/mol/s",
			Point{T: 300, P: units.AtmPa, K: 1e13}, 3},
		{"brackets, order, spaces", "k [cm3 mol-1 s-1], T [K], P (bar)\n 1e12, 300, 1\n2e12,400,1\n3e12,500,1\n", "cm3 mol-1 s-1",
			Point{T: 300, P: 1e5, K: 1e12}, 3},
		{"sigma fraction", "T/K,P/kPa,k/s-1,sigma\n300,100,1,0.1\n400,100,2,0.2\n500,100,3,0.1\n", "s-1", Point{T: 300, P: 1e5, K: 1, Sigma: 0.1}, 3},
		{"uncertainty per cent", "T/K,P/hPa,k/s-1,uncertainty/%\n300,1000,1,10\n400,1000,2,20\n500,1000,3,10\n", "s-1", Point{T: 300, P: 1e5, K: 1, Sigma: 0.1}, 3},
		{"Pa and mbar", "T/K,P/mbar,k/s-1\n300,1000,1\n400,1000,2\n500,1000,3\n", "s-1", Point{T: 300, P: 1e5, K: 1}, 3},
		{"replicates", "T/K,P/atm,k/s-1\n300,1,1\n300,1,2\n500,1,3\n", "s-1", Point{T: 300, P: units.AtmPa, K: 1}, 3},
		{"replicates 25x apart with uncertainties", "T/K,P/atm,k/s-1,sigma\n300,1,1,0.5\n300,1,25,0.5\n500,1,3,0.5\n", "s-1", Point{T: 300, P: units.AtmPa, K: 1, Sigma: 0.5}, 3},
		{"byte-order mark (spreadsheet export)", "\ufeffT/K,P/atm,k/s-1\r\n300,1,2.5e3\r\n400,1,3e3\r\n500,2,4e3\r\n", "s-1", Point{T: 300, P: units.AtmPa, K: 2.5e3}, 3},
	} {
		t.Run(c.name, func(t *testing.T) {
			tab, err := ReadCSV("in.csv", strings.NewReader(c.in))
			if err != nil {
				t.Fatal(err)
			}
			if tab.KUnits != c.kUnits || len(tab.Points) != c.n {
				t.Errorf("units %q, %d points; want %q, %d", tab.KUnits, len(tab.Points), c.kUnits, c.n)
			}
			p := tab.Points[0]
			if p.T != c.first.T || !scalar.EqualWithinRel(p.P, c.first.P, 1e-12) || p.K != c.first.K || !scalar.EqualWithinRel(p.Sigma, c.first.Sigma, 1e-12) {
				t.Errorf("first point %+v, want %+v", p, c.first)
			}
		})
	}
}

func TestReadCSVBad(t *testing.T) {
	// Each error is one line naming the file, line and (where there is one)
	// column, with a hint.
	const ok = "300,1,1\n400,1,2\n500,1,3\n"
	for _, c := range []struct {
		name string
		in   string
		want []string // substrings of the message
	}{
		{"empty", "", []string{"in.csv", "empty file"}},
		{"missing header", "300,1,1\n400,1,2\n500,1,3\n", []string{"in.csv:1", "column 1", "missing header", "T/K,P/atm,k/s-1"}},
		{"no k units", "T/K,P/atm,k\n" + ok, []string{"in.csv:1", "column 3", "without units"}},
		{"unknown pressure unit", "T/K,P/psi,k/s-1\n" + ok, []string{"in.csv:1", "column 2", "psi", "atm, Torr"}},
		{"temperature in C", "T/C,P/atm,k/s-1\n" + ok, []string{"in.csv:1", "column 1", "kelvin"}},
		{"unknown column", "T/K,P/atm,k/s-1,note\n300,1,1,a\n", []string{"in.csv:1", "column 4", "unknown column"}},
		{"no P column", "T/K,k/s-1\n300,1\n400,2\n500,3\n", []string{"in.csv:1", "no P/<unit> column"}},
		{"too few points", "T/K,P/atm,k/s-1\n300,1,1\n400,1,2\n", []string{"in.csv", "2 data rows", "at least 3"}},
		{"uncertainty below representation", "T/K,P/atm,k/s-1,sigma/%\n300,1,1,3e-323\n400,1,2,5\n500,1,3,5\n", []string{"in.csv:2", "column 4", "too small"}},
		{"non-positive k", "T/K,P/atm,k/s-1\n300,1,1\n400,1,0\n500,1,3\n", []string{"in.csv:3", "column 3 (k/s-1)", `"0"`, "non-positive k"}},
		{"negative k", "T/K,P/atm,k/s-1\n300,1,1\n400,1,2\n500,1,-3\n", []string{"in.csv:4", "column 3", "non-positive k"}},
		{"NaN k", "T/K,P/atm,k/s-1\n300,1,1\n400,1,NaN\n500,1,3\n", []string{"in.csv:3", "column 3", "not a finite number"}},
		{"bad number", "T/K,P/atm,k/s-1\n300,1,1\n400,1.0.1,2\n500,1,3\n", []string{"in.csv:3", "column 2 (P/atm)", `"1.0.1"`, "not a number"}},
		{"units in a row", "T/K,P/atm,k/s-1\n300,1,1\n400 K,1,2\n500,1,3\n", []string{"in.csv:3", "column 1", "units belong in the header"}},
		{"a word for a number", "T/K,P/atm,k/s-1\n300,1,1\n400,1,fast\n500,1,3\n", []string{"in.csv:3", "column 3 (k/s-1)", `"fast"`, "write a plain number"}},
		{"mixed fields", "T/K,P/atm,k/s-1\n300,1,1\n400,1,2,5\n500,1,3\n", []string{"in.csv:3", "4 fields, the header has 3"}},
		{"decimal comma", "T/K,P/atm,k/s-1\n300,1,1\n400,1,2,5\n", []string{"in.csv:3", "decimal commas"}},
		{"replicates 10x apart without uncertainties", "T/K,P/atm,k/s-1\n300,1,1\n300,1,2\n300,1,25\n500,1,3\n", []string{"in.csv:4", `"300,1,25"`, "factor 25", "line 2", "sigma column"}},
		{"zero pressure", "T/K,P/atm,k/s-1\n300,0,1\n400,1,2\n500,1,3\n", []string{"in.csv:2", "column 2", "pressure must be positive"}},
		{"uncertainty without unit", "T/K,P/atm,k/s-1,uncertainty\n300,1,1,5\n", []string{"in.csv:1", "column 4", "uncertainty/%"}},
		{"duplicate column", "T/K,P/atm,P/bar,k/s-1\n300,1,1,1\n", []string{"in.csv:1", "column 3", "same quantity as column 2"}},
		{"bad quote", "T/K,P/atm,k/s-1\n300,1,1\n400,\"1,2\n", []string{"in.csv:", "quot"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			tab, err := ReadCSV("in.csv", strings.NewReader(c.in))
			if err == nil {
				t.Fatalf("no error; got %d points", len(tab.Points))
			}
			var ce *CSVError
			if !errors.As(err, &ce) {
				t.Errorf("error %T is not a *CSVError", err)
			}
			msg := err.Error()
			if strings.Contains(msg, "\n") {
				t.Errorf("message has more than one line: %q", msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q lacks %q", msg, w)
				}
			}
		})
	}
}

// Tables in testdata, generated from published parameters (regenerate
// with go test -run TestTestdata -update).
var testdataTables = []struct {
	file   string
	header string
	f      Evaluator
	temps  []float64
	press  []float64 // in the file's pressure unit
	pUnit  float64   // Pa per file unit
	kScale float64   // file k = Eval · kScale
	sigma  string    // per-row uncertainty column value, or ""
}{
	{
		file: "h_ch3_gri30.csv",
		header: "# H+CH3(+M)<=>CH4(+M), k(T,P) generated from the GRI-Mech 3.0 parameters\n" +
			"# (Smith et al., 1999): k_inf 1.39e16 T^-0.534 exp(-536 cal/mol/RT), LOW 2.62e33\n" +
			"# T^-4.76 exp(-2440/RT), TROE .783 74 2941 6964; [M] = P/RT (pure collider).\n" +
			"T/K,P/atm,k/cm3/mol/s\n",
		f:     griHCH3(),
		temps: []float64{300, 500, 800, 1200, 1600, 2000, 2500},
		press: []float64{0.01, 0.1, 1, 10, 100},
		pUnit: units.AtmPa, kScale: 1,
	},
	{
		file: "oh_no2_jpl.csv",
		header: "# OH+NO2+M->HNO3+M, k(T,P) generated from the falloff form of NASA/JPL Publication\n" +
			"# 19-5 with k0 = 1.8e-30 (T/300)^-3.0 cm6 molecule-2 s-1, k_inf = 2.8e-11 cm3\n" +
			"# molecule-1 s-1, Fc = 0.6. The uncertainty column is illustrative.\n" +
			"T/K,P/hPa,k/cm3/molecule/s,uncertainty/%\n",
		f:     jplOHNO2,
		temps: []float64{200, 225, 250, 275, 300},
		press: []float64{1, 10, 100, 1000},
		pUnit: 100, kScale: 1, sigma: "10",
	},
}

func TestTestdata(t *testing.T) {
	// The files hold 6 significant digits, so they agree with the
	// generating form to 1e-5 relative.
	const tol = 1e-5
	for _, d := range testdataTables {
		t.Run(d.file, func(t *testing.T) {
			path := filepath.Join("testdata", d.file)
			if *update {
				var b strings.Builder
				b.WriteString(d.header)
				for _, T := range d.temps {
					for _, p := range d.press {
						fmt.Fprintf(&b, "%g,%g,%.6g", T, p, d.f.Eval(T, p*d.pUnit)*d.kScale)
						if d.sigma != "" {
							b.WriteString("," + d.sigma)
						}
						b.WriteString("\n")
					}
				}
				if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			f, err := os.Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			tab, err := ReadCSV(d.file, f)
			if err != nil {
				t.Fatal(err)
			}
			if len(tab.Points) != len(d.temps)*len(d.press) {
				t.Fatalf("%d points, want %d", len(tab.Points), len(d.temps)*len(d.press))
			}
			for _, p := range tab.Points {
				if want := d.f.Eval(p.T, p.P) * d.kScale; math.Abs(p.K/want-1) > tol {
					t.Errorf("k(%g K, %g Pa) = %g, want %g", p.T, p.P, p.K, want)
				}
			}
		})
	}
}

func TestFitCSVFiles(t *testing.T) {
	// The testdata tables, read and fitted by Troe. The GRI table holds 6
	// digits, so its refit is good to ~1e-5 (0.01 % allowed); the JPL
	// table differs from the Troe shape, as in TestJPLFalloff (5 %).
	for _, c := range []struct {
		file      string
		maxErrPct float64
	}{{"h_ch3_gri30.csv", 0.01}, {"oh_no2_jpl.csv", 5}} {
		t.Run(c.file, func(t *testing.T) {
			f, err := os.Open(filepath.Join("testdata", c.file))
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			tab, err := ReadCSV(c.file, f)
			if err != nil {
				t.Fatal(err)
			}
			res, err := FitAll(tab, []FormName{FormTroe}, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if res.Troe.MaxErrorPct > c.maxErrPct {
				t.Errorf("troe max error %.3g %% > %g %%", res.Troe.MaxErrorPct, c.maxErrPct)
			}
			t.Logf("%s: troe max error %.3g %%, %s", c.file, res.Troe.MaxErrorPct, res.Reason)
		})
	}
}

// limitTime bounds how long refusing an oversize table may take: reading
// MaxCSVBytes from memory or /dev/zero takes a few hundredths of a second;
// 10 s leaves room for a loaded CI machine and still catches an endless
// read.
const limitTime = 10 * time.Second

// A table beyond MaxCSVBytes, from a stream (ReadCSV), from a file or from
// /dev/zero (ReadCSVFile), is refused at once with one line naming the
// limit.
func TestReadCSVTooLarge(t *testing.T) {
	check := func(name string, err error, start time.Time) {
		t.Helper()
		var ce *CSVError
		if !errors.As(err, &ce) || ce.File != name || !strings.Contains(err.Error(), "larger than 32 MiB") || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: err = %v, want one line saying it is larger than 32 MiB", name, err)
		}
		if d := time.Since(start); d > limitTime {
			t.Errorf("%s: took %v", name, d)
		}
	}
	row := "300,1,1.5e+13\n"
	endless := io.MultiReader(strings.NewReader("T/K,P/atm,k/s-1\n"), repeatReader(row))
	start := time.Now()
	_, err := ReadCSV("stream.csv", endless)
	check("stream.csv", err, start)

	big := filepath.Join(t.TempDir(), "big.csv")
	if err := os.WriteFile(big, []byte(strings.Repeat(row, MaxCSVBytes/len(row)+1)), 0o644); err != nil {
		t.Fatal(err)
	}
	start = time.Now()
	_, _, err = ReadCSVFile(big)
	check(big, err, start)

	if _, err := os.Stat("/dev/zero"); err == nil {
		start = time.Now()
		_, _, err = ReadCSVFile("/dev/zero")
		check("/dev/zero", err, start)
	}
}

// repeatReader is an endless stream of s.
type repeatReader string

func (r repeatReader) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		n += copy(p[n:], r)
	}
	return n, nil
}

// A long cell is quoted cut to 60 characters with its length; control
// characters in cells and headers are shown escaped, never raw.
func TestCSVErrorClipsAndEscapes(t *testing.T) {
	cell := strings.Repeat("8", 5_000_000) + "x"
	_, err := ReadCSV("long.csv", strings.NewReader("T/K,P/atm,k/s-1\n300,1,"+cell+"\n"))
	if err == nil || len(err.Error()) > 300 || !strings.Contains(err.Error(), `"`+strings.Repeat("8", 60)+`"… (5000001 bytes)`) {
		t.Errorf("a 5 MB cell: message of %d bytes: %.300s", len(err.Error()), err)
	}
	_, err = ReadCSV("esc\x1b.csv", strings.NewReader("T/K,P/atm,k/s-1\u2028\n300,1,1\n"))
	if err == nil || strings.ContainsAny(err.Error(), "\x1b\u2028") || !strings.Contains(err.Error(), `esc\x1b.csv`) {
		t.Errorf("message %q: want the file name and header escaped", err)
	}
	_, err = ReadCSV("head.csv", strings.NewReader("T/K,P/atm,k/s-1,"+strings.Repeat("Z", 1000)+"\n300,1,1,1\n"))
	if err == nil || len(err.Error()) > 400 || !strings.Contains(err.Error(), "(1000 bytes)") {
		t.Errorf("a 1000-character header: %v", err)
	}
}
