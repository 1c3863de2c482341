package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/batch"
)

// batchData is the batch test data: invented reactions (the demo molecule
// with varied barriers and frequencies) and their manifests.
const batchData = "../../testdata/batch"

// runBatch runs `falloff batch` in-process and fails the test on an
// unexpected exit code.
func runBatch(t *testing.T, want int, args ...string) (string, string) {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"batch"}, args...)...)
	if code != want {
		t.Fatalf("falloff batch %v: exit %d, want %d\nstderr: %s", args, code, want, errs)
	}
	return out, errs
}

// mechanismEntries reads the reactions list of a Cantera YAML mechanism
// file, each entry as a generic map (numbers as YAML reads them).
func mechanismEntries(t *testing.T, path string) []map[string]any {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Reactions []map[string]any `yaml:"reactions"`
	}
	if err := yaml.Unmarshal(b, &doc); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return doc.Reactions
}

// textEntries returns the reaction and auxiliary lines of a keyword-text
// mechanism (between REACTIONS and END, comments left out) and the
// DUPLICATE lines apart.
func textEntries(t *testing.T, path string) (lines []string, dups int) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	in := false
	for _, l := range strings.Split(string(b), "\n") {
		switch {
		case strings.HasPrefix(l, "REACTIONS"):
			in = true
		case l == "END":
			in = false
		case !in || strings.HasPrefix(l, "!"):
		case strings.TrimSpace(l) == "DUPLICATE":
			dups++
		default:
			lines = append(lines, l)
		}
	}
	return lines, dups
}

// The merged mechanism is the concatenation of the per-reaction results:
// every entry of each reaction's reactions.yaml, in manifest order, with
// the same numbers (the Cantera YAML read back and compared exactly, and
// the keyword text compared line by line), plus duplicate flags on the
// two entries that share an equation (r07 and r08, the same reaction by
// two paths): Cantera and keyword-format readers stop on an undeclared
// duplicate (Cantera's YAML reference, reactions.md, "duplicate"; the
// DUPLICATE keyword of the GRI-Mech 3.0 file). The per-reaction files are
// written by the rates command's code, the merged ones from the records
// on disk, so this also checks that a record keeps every number exactly.
func TestBatchMergedIsConcatenation(t *testing.T) {
	out := filepath.Join(t.TempDir(), "out")
	stdout, _ := runBatch(t, exitOK, filepath.Join(batchData, "mechanism-8.yaml"), "--out", out, "-q")
	if !strings.Contains(stdout, "Caution: computed rate coefficients are model estimates") {
		t.Error("the summary has no caution")
	}
	merged := mechanismEntries(t, filepath.Join(out, "mechanism", "reactions.yaml"))
	mergedText, dups := textEntries(t, filepath.Join(out, "mechanism", "reactions.txt"))
	var concat []map[string]any
	var concatText []string
	var dupIndex []int
	for i := 1; i <= 8; i++ {
		dir := filepath.Join(out, "reactions", fmt.Sprintf("r%02d", i))
		es := mechanismEntries(t, filepath.Join(dir, "reactions.yaml"))
		if len(es) != 1 {
			t.Fatalf("r%02d: %d entries", i, len(es))
		}
		if i == 7 || i == 8 {
			dupIndex = append(dupIndex, len(concat))
		}
		concat = append(concat, es...)
		lines, _ := textEntries(t, filepath.Join(dir, "reactions.txt"))
		concatText = append(concatText, lines...)
	}
	if len(merged) != len(concat) {
		t.Fatalf("%d merged entries, %d per reaction", len(merged), len(concat))
	}
	for i := range merged {
		dup, _ := merged[i]["duplicate"].(bool)
		if dup != slices.Contains(dupIndex, i) {
			t.Errorf("entry %d: duplicate %v", i, dup)
		}
		delete(merged[i], "duplicate")
		if !reflect.DeepEqual(merged[i], concat[i]) {
			t.Errorf("entry %d differs:\nmerged %v\nalone  %v", i, merged[i], concat[i])
		}
	}
	if !slices.Equal(mergedText, concatText) {
		t.Errorf("keyword text differs:\nmerged %q\nalone  %q", mergedText, concatText)
	}
	if dups != 2 {
		t.Errorf("%d DUPLICATE lines, want 2", dups)
	}
	// Every entry carries its provenance: name, input checksum, version,
	// settings.
	b, _ := os.ReadFile(filepath.Join(out, "mechanism", "reactions.yaml"))
	if n := strings.Count(string(b), "Provenance: input"); n != 8 {
		t.Errorf("%d provenance comments, want 8", n)
	}
}

// Each reaction's folder holds exactly the files `rates --out` writes for
// the same input and options, byte for byte (summary.json apart from the
// paths it lists).
func TestBatchFilesAreRatesFiles(t *testing.T) {
	dir := t.TempDir()
	in, err := os.ReadFile(filepath.Join(batchData, "inputs", "r03.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	// A complete input: the manifest adds nothing to it.
	full := string(in) + "bath: {gas: Ar}\nenergy-transfer: {model: exponential-down, alpha-300: 250 cm-1, alpha-exponent: 0.85}\n" +
		"grid:\n  temperatures: {from: 800 K, to: 1400 K, points: 5}\n  pressures: {from: 0.1 bar, to: 10 bar, points: 5}\nfits: [troe, plog, chebyshev]\n"
	input := filepath.Join(dir, "r03.yaml")
	if err := os.WriteFile(input, []byte(full), 0o644); err != nil {
		t.Fatal(err)
	}
	manifest := filepath.Join(dir, "m.yaml")
	if err := os.WriteFile(manifest, []byte("inputs: [r03.yaml]\noptions: {tolerance: 5, energy-unit: kJ/mol, direction: forward}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	runBatch(t, exitOK, manifest, "--out", filepath.Join(dir, "b"), "-q")
	if code, _, errs := runCLI(t, "rates", input, "--out", filepath.Join(dir, "r"), "--tolerance", "5", "--energy-unit", "kJ/mol", "-q"); code != 0 {
		t.Fatal(errs)
	}
	list := func(d string) []string {
		es, err := os.ReadDir(d)
		if err != nil {
			t.Fatal(err)
		}
		var names []string
		for _, e := range es {
			names = append(names, e.Name())
		}
		return names
	}
	bd, rd := filepath.Join(dir, "b", "reactions", "r03"), filepath.Join(dir, "r")
	names := list(rd)
	if got := list(bd); !slices.Equal(got, names) {
		t.Fatalf("batch wrote %v, rates %v", got, names)
	}
	paths := regexp.MustCompile(`"(files_written|file_checksums)": (\[[^\]]*\]|\{[^}]*\})`)
	for _, n := range names {
		a, _ := os.ReadFile(filepath.Join(bd, n))
		b, _ := os.ReadFile(filepath.Join(rd, n))
		if n == "summary.json" {
			a, b = paths.ReplaceAll(a, nil), paths.ReplaceAll(b, nil)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between batch and rates", n)
		}
	}
}

// A manifest with one broken input: the others complete and are merged;
// the exit code is the broken input's (1, bad input); stderr and the
// summary name it with its one-line error; the merged header says it was
// left out.
func TestBatchBrokenInput(t *testing.T) {
	out := filepath.Join(t.TempDir(), "out")
	stdout, stderr := runBatch(t, exitInput, filepath.Join(batchData, "broken.yaml"), "--out", out, "-q")
	want := `r-bad.yaml:7: molecules.ringbad.vibrations.unit: "cm-2": unknown unit`
	if !strings.Contains(stderr, "1 of 4 reactions failed: r-bad (") || !strings.Contains(stderr, want) {
		t.Errorf("stderr: %s", stderr)
	}
	if strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
		t.Errorf("stderr is not one line: %q", stderr)
	}
	summary, err := os.ReadFile(filepath.Join(out, "mechanism", "summary.txt"))
	if err != nil {
		t.Fatal(err)
	}
	if string(summary) != stdout || !strings.Contains(stdout, "r-bad: FAILED: ") || !strings.Contains(stdout, want) {
		t.Errorf("summary:\n%s", stdout)
	}
	if !regexp.MustCompile(`\|\s+r-bad \|\s+\| FAILED \|`).MatchString(stdout) {
		t.Errorf("no FAILED row for r-bad:\n%s", stdout)
	}
	for _, name := range []string{"r01", "r02", "r03"} {
		if _, err := os.Stat(filepath.Join(out, "reactions", name, "reactions.yaml")); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	if n := len(mechanismEntries(t, filepath.Join(out, "mechanism", "reactions.yaml"))); n != 3 {
		t.Errorf("%d merged entries, want 3", n)
	}
	b, _ := os.ReadFile(filepath.Join(out, "mechanism", "reactions.yaml"))
	if !strings.Contains(string(b), "# Left out: r-bad (failed)") {
		t.Error("the merged header does not name the reaction left out")
	}
	csv, _ := os.ReadFile(filepath.Join(out, "mechanism", "summary.csv"))
	if !strings.Contains(string(csv), "r-bad,") || !strings.Contains(string(csv), ",failed,") {
		t.Errorf("summary.csv:\n%s", csv)
	}
}

// Slices run one after another into one folder, as a job array does: the
// merge refuses while a slice is missing (naming it) and while a reaction
// is stale after its input changed; once all are up to date it writes the
// same merged mechanism as one whole run, byte for byte.
func TestBatchShardsAndMerge(t *testing.T) {
	dir := t.TempDir()
	// A copy of the test inputs, to change one, and a manifest of five.
	if err := os.CopyFS(dir, os.DirFS(batchData)); err != nil {
		t.Fatal(err)
	}
	m8, _ := os.ReadFile(filepath.Join(dir, "mechanism-8.yaml"))
	manifest := filepath.Join(dir, "mechanism-5.yaml")
	if err := os.WriteFile(manifest, bytes.Replace(m8, []byte("r0[1-8].yaml"), []byte("r0[1-5].yaml"), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	whole, sliced := filepath.Join(dir, "whole"), filepath.Join(dir, "sliced")
	runBatch(t, exitOK, manifest, "--out", whole, "-q")
	for k := 1; k <= 3; k++ {
		if k == 3 {
			_, stderr := runBatch(t, exitInput, manifest, "--out", sliced, "--merge")
			if !strings.Contains(stderr, "cannot merge: 1 of 5 reactions are not up to date") || !strings.Contains(stderr, "r03 (slice 3/3)") ||
				!strings.Contains(stderr, "run the slices 3/3 again") {
				t.Errorf("merge with slice 3 missing: %s", stderr)
			}
		}
		// Slice 2 names the manifest by a relative path: the keys and the
		// merged files do not depend on how its path is spelled.
		path := manifest
		if k == 2 {
			wd, _ := os.Getwd()
			rel, err := filepath.Rel(wd, manifest)
			if err != nil {
				t.Fatal(err)
			}
			path = "./" + rel
		}
		runBatch(t, exitOK, path, "--out", sliced, "--shard", fmt.Sprintf("%d/3", k), "-q")
	}
	if _, err := os.Stat(filepath.Join(sliced, "mechanism")); err == nil {
		t.Error("a slice wrote the merged mechanism")
	}
	runBatch(t, exitOK, manifest, "--out", sliced, "--merge", "-q")
	for _, f := range []string{"reactions.yaml", "reactions.txt", "summary.csv"} {
		a, _ := os.ReadFile(filepath.Join(whole, "mechanism", f))
		b, _ := os.ReadFile(filepath.Join(sliced, "mechanism", f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s: merged slices differ from the whole run", f)
		}
	}
	// An input changes: its reaction is stale, and the merge says which
	// slice to run again.
	in := filepath.Join(dir, "inputs", "r05.yaml")
	b, _ := os.ReadFile(in)
	if err := os.WriteFile(in, bytes.Replace(b, []byte("alpha-300: 350 cm-1"), []byte("alpha-300: 340 cm-1"), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	_, stderr := runBatch(t, exitInput, manifest, "--out", sliced, "--merge")
	if !strings.Contains(stderr, "1 stale") || !strings.Contains(stderr, "r05 (slice 2/3)") {
		t.Errorf("merge with r05 stale: %s", stderr)
	}
	_, stderr = runBatch(t, exitOK, manifest, "--out", sliced, "--shard", "2/3")
	if !strings.Contains(stderr, "batch slice 2/3: 2 reactions: 1 computed, 1 up to date, 0 failed") {
		t.Errorf("re-run of slice 2: %s", stderr)
	}
	runBatch(t, exitOK, manifest, "--out", sliced, "--merge", "-q")
}

func TestBatchUsage(t *testing.T) {
	m := filepath.Join(batchData, "mechanism-8.yaml")
	for _, tc := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"batch"}, exitUsage, "batch takes one manifest file"},
		{[]string{"batch", m, "--shard", "4/3"}, exitUsage, `--shard: "4/3" is not a slice K/N`},
		{[]string{"batch", m, "--merge", "--shard", "1/2"}, exitUsage, "--merge computes nothing"},
		{[]string{"batch", filepath.Join(batchData, "inputs", "r01.yaml")}, exitInput, "r01.yaml:6: molecules: unknown key"},
	} {
		code, _, stderr := runCLI(t, tc.args...)
		if code != tc.code || !strings.Contains(stderr, tc.want) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", tc.args, code, stderr, tc.code, tc.want)
		}
	}
}

// A manifest option is checked by the rates command's own validation and
// reported at its line in the manifest.
func TestBatchOptionError(t *testing.T) {
	dir := t.TempDir()
	if err := os.CopyFS(dir, os.DirFS(filepath.Join(batchData, "inputs"))); err != nil {
		t.Fatal(err)
	}
	m := filepath.Join(dir, "m.yaml")
	if err := os.WriteFile(m, []byte("inputs: [r01.yaml]\noptions:\n  tolerance: 5\n  direction: sideways\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := runCLI(t, "batch", m)
	if code != exitInput || !strings.Contains(stderr, `m.yaml:4: options.direction: "sideways": `) || !strings.Contains(stderr, "use forward or recombination") {
		t.Errorf("exit %d: %s", code, stderr)
	}
}

// slowManifest writes a manifest of six test reactions on a finer grid
// (12 × 10 points, about a second each on one core) into dir.
func slowManifest(t *testing.T, dir string) string {
	abs, err := filepath.Abs(filepath.Join(batchData, "inputs"))
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString("title: six invented reactions on a finer grid (test data, invented)\ninputs:\n")
	for i := 1; i <= 6; i++ {
		fmt.Fprintf(&b, "  - %s\n", filepath.Join(abs, fmt.Sprintf("r%02d.yaml", i)))
	}
	b.WriteString(`settings:
  bath: {gas: Ar}
  energy-transfer: {model: exponential-down, alpha-300: 250 cm-1, alpha-exponent: 0.85}
  grid:
    temperatures: {from: 800 K, to: 1400 K, points: 12}
    pressures: {from: 0.1 bar, to: 10 bar, points: 10}
  fits: [troe, plog, chebyshev]
options: {tolerance: 5}
`)
	m := filepath.Join(dir, "slow.yaml")
	if err := os.WriteFile(m, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return m
}

// computedRe reads the counts line of a batch run.
var computedRe = regexp.MustCompile(`batch: (\d+) reactions: (\d+) computed, (\d+) up to date, (\d+) failed`)

// Resume after a signal: a batch killed mid-run (SIGINT, the clean stop of
// Ctrl-C; SIGKILL, no chance to clean up) keeps the reactions finished
// before it; the re-run computes exactly the others (counted from the
// report and, independently, from which record files were replaced) and
// the final output equals an uninterrupted run's byte for byte. The run is
// the falloff binary (this test binary standing in for it, TestMain) as a
// child process.
func TestBatchResumeAfterSignal(t *testing.T) {
	if testing.Short() {
		t.Skip("runs batches of several seconds as child processes")
	}
	dir := t.TempDir()
	m := slowManifest(t, dir)
	ref := filepath.Join(dir, "ref")
	runBatch(t, exitOK, m, "--out", ref, "-q", "--jobs", "1")
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGKILL} {
		t.Run(sig.String(), func(t *testing.T) {
			out := filepath.Join(dir, "out-"+strconv.Itoa(int(sig)))
			records := filepath.Join(out, "records")
			cmd := exec.Command(os.Args[0], "batch", m, "--out", out, "--jobs", "1", "-q")
			cmd.Env = append(os.Environ(), "FALLOFF_RUN_MAIN=1")
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			// Wait for two reactions to be recorded, then signal while the
			// third is in flight.
			deadline := time.Now().Add(60 * time.Second)
			for {
				if recs, _ := filepath.Glob(filepath.Join(records, "*.json")); len(recs) >= 2 {
					break
				}
				if time.Now().After(deadline) {
					cmd.Process.Kill()
					t.Fatal("no two records after 60 s")
				}
				time.Sleep(20 * time.Millisecond)
			}
			time.Sleep(300 * time.Millisecond)
			if err := cmd.Process.Signal(sig); err != nil {
				t.Fatal(err)
			}
			err := cmd.Wait()
			var ee *exec.ExitError
			if !errors.As(err, &ee) {
				t.Fatalf("the batch finished before the signal (%v)", err)
			}
			if sig == syscall.SIGINT && (ee.ExitCode() != exitInterrupted || !strings.Contains(stderr.String(), "run the same command again")) {
				t.Errorf("exit %d, stderr %q", ee.ExitCode(), stderr.String())
			}
			// What the interrupted run left: whole records and whole files.
			before := map[string]os.FileInfo{}
			es, _ := os.ReadDir(records)
			for _, e := range es {
				if strings.HasPrefix(e.Name(), ".") {
					// SIGKILL may land while a record is being written: its
					// temporary file stays, never read as a record.
					if sig == syscall.SIGINT {
						t.Errorf("temporary file %s left in the records", e.Name())
					}
					continue
				}
				fi, _ := os.Stat(filepath.Join(records, e.Name()))
				before[e.Name()] = fi
				name := strings.TrimSuffix(e.Name(), ".json")
				if st, _ := (batch.Store{Dir: records}).StateOf(&batch.Resolved{Reaction: batch.Reaction{Name: name}}); st == batch.Missing {
					t.Errorf("record %s cannot be read", e.Name())
				}
			}
			done := len(before)
			t.Logf("%d of 6 reactions done at the %v", done, sig)
			if done < 2 || done >= 6 {
				t.Fatalf("%d reactions done at the signal", done)
			}
			if _, err := os.Stat(filepath.Join(out, "mechanism")); err == nil {
				t.Error("an interrupted run wrote a merged mechanism")
			}
			_, rerr := runBatch(t, exitOK, m, "--out", out, "--jobs", "1")
			c := computedRe.FindStringSubmatch(rerr)
			if c == nil || c[2] != strconv.Itoa(6-done) || c[3] != strconv.Itoa(done) {
				t.Errorf("resume after %d done: %q", done, rerr)
			}
			replaced := 0
			es, _ = os.ReadDir(records)
			for _, e := range es {
				if strings.HasPrefix(e.Name(), ".") {
					continue
				}
				fi, _ := os.Stat(filepath.Join(records, e.Name()))
				if old, ok := before[e.Name()]; !ok || !os.SameFile(old, fi) {
					replaced++
				}
			}
			if replaced != 6-done {
				t.Errorf("%d records written by the resume, want %d", replaced, 6-done)
			}
			compareTrees(t, ref, out)
		})
	}
}

// compareTrees checks that the mechanism files and every reaction's
// mechanism files and grid are the same in two output folders.
func compareTrees(t *testing.T, a, b string) {
	t.Helper()
	files := []string{"mechanism/reactions.yaml", "mechanism/reactions.txt", "mechanism/summary.csv"}
	for i := 1; i <= 6; i++ {
		for _, f := range []string{"reactions.yaml", "reactions.txt", "grid.csv"} {
			files = append(files, fmt.Sprintf("reactions/r%02d/%s", i, f))
		}
	}
	for _, f := range files {
		x, err1 := os.ReadFile(filepath.Join(a, f))
		y, err2 := os.ReadFile(filepath.Join(b, f))
		if err1 != nil || err2 != nil || !bytes.Equal(x, y) {
			t.Errorf("%s differs from the uninterrupted run (%v, %v)", f, err1, err2)
		}
	}
}

// BenchmarkBatchLocal is the local path's throughput on the 20 invented
// demo-sized reactions of testdata/batch/mechanism-20.yaml, every reaction
// computed (--force), on all cores: reactions/min is the figure of
// docs/performance.md beside the scheduler's (scripts/slurm-check.sh).
func BenchmarkBatchLocal(b *testing.B) {
	out := filepath.Join(b.TempDir(), "out")
	m := filepath.Join(batchData, "mechanism-20.yaml")
	start := time.Now()
	n := 0
	for b.Loop() {
		var o, e bytes.Buffer
		if code := run([]string{"batch", m, "--out", out, "--force", "-q"}, strings.NewReader(""), &o, &e); code != 0 {
			b.Fatal(e.String())
		}
		n++
	}
	b.ReportMetric(float64(20*n)/time.Since(start).Minutes(), "reactions/min")
}

// Species thermochemistry where the inputs give it: the merged species.yaml
// holds every species of the reactions' own species.yaml once (the bath
// gas, Ar, shared by both), each entry as the reaction wrote it, and a
// phase.yaml that loads it; the header warns that placeholder enthalpies
// from two inputs are not on one scale (docs/thermo.md).
func TestBatchMergedSpecies(t *testing.T) {
	dir := t.TempDir()
	for _, i := range []string{"01", "02"} {
		b, err := os.ReadFile(filepath.Join(batchData, "inputs", "r"+i+".yaml"))
		if err != nil {
			t.Fatal(err)
		}
		b = append(b, fmt.Sprintf("thermo:\n  molecules:\n    ring%s:\n      composition: {C: 5, H: 10}\n", i)...)
		if err := os.WriteFile(filepath.Join(dir, "r"+i+".yaml"), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	m, _ := os.ReadFile(filepath.Join(batchData, "mechanism-8.yaml"))
	manifest := filepath.Join(dir, "m.yaml")
	if err := os.WriteFile(manifest, bytes.Replace(m, []byte("inputs/r0[1-8].yaml"), []byte("r0*.yaml"), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	runBatch(t, exitOK, manifest, "--out", out, "-q")
	species := func(path string) []map[string]any {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		var doc struct {
			Species []map[string]any `yaml:"species"`
		}
		if err := yaml.Unmarshal(b, &doc); err != nil {
			t.Fatal(err)
		}
		return doc.Species
	}
	merged := species(filepath.Join(out, "mechanism", "species.yaml"))
	var want []map[string]any
	seen := map[string]bool{}
	for _, r := range []string{"r01", "r02"} {
		for _, s := range species(filepath.Join(out, "reactions", r, "species.yaml")) {
			if name := s["name"].(string); !seen[name] {
				seen[name] = true
				want = append(want, s)
			}
		}
	}
	if len(want) != 3 || !reflect.DeepEqual(merged, want) {
		t.Errorf("merged species %v\nwant %v", merged, want)
	}
	if _, err := os.Stat(filepath.Join(out, "mechanism", "phase.yaml")); err != nil {
		t.Error(err)
	}
	b, _ := os.ReadFile(filepath.Join(out, "mechanism", "reactions.yaml"))
	if !strings.Contains(string(b), "placeholder scale come from different inputs") {
		t.Error("no warning on placeholder enthalpies from two inputs")
	}
}
