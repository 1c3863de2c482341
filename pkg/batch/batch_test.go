package batch

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync/atomic"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
)

// testdata is the repository's batch test data (invented reactions).
const testdata = "../../testdata/batch"

// Sharding is a partition of the manifest for every N = 1 … 7: each
// reaction in exactly one slice, the union the whole manifest, slice
// sizes within one of each other (round-robin). The check is the
// definition of a partition (exact), over manifest sizes 0 … 25 and the
// 20-reaction test manifest.
func TestShardPartition(t *testing.T) {
	m, err := ReadManifest(filepath.Join(testdata, "mechanism-20.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	real := m.Resolve()
	for size := 0; size <= 25; size++ {
		rs := make([]*Resolved, size)
		for i := range rs {
			rs[i] = &Resolved{Reaction: Reaction{Name: fmt.Sprintf("r%02d", i)}, Index: i}
		}
		if size == len(real) {
			rs = real
		}
		for n := 1; n <= 7; n++ {
			seen := map[string]int{}
			lo, hi := size, 0
			for k := 1; k <= n; k++ {
				sel := Shard{k, n}.Select(rs)
				lo, hi = min(lo, len(sel)), max(hi, len(sel))
				for _, r := range sel {
					seen[r.Name]++
				}
			}
			for _, r := range rs {
				if seen[r.Name] != 1 {
					t.Errorf("size %d, N=%d: %s in %d slices", size, n, r.Name, seen[r.Name])
				}
			}
			if len(seen) != size {
				t.Errorf("size %d, N=%d: %d reactions in the slices", size, n, len(seen))
			}
			if size > 0 && hi-lo > 1 {
				t.Errorf("size %d, N=%d: slice sizes %d … %d", size, n, lo, hi)
			}
		}
	}
}

// The assignment is stable: the same manifest read again (another node of
// a job array) gives every reaction the same slice, whatever is done.
func TestShardStable(t *testing.T) {
	path := filepath.Join(testdata, "mechanism-20.yaml")
	a, err := ReadManifest(path)
	if err != nil {
		t.Fatal(err)
	}
	b, err := ReadManifest(path)
	if err != nil {
		t.Fatal(err)
	}
	ra, rb := a.Resolve(), b.Resolve()
	for n := 1; n <= 7; n++ {
		for k := 1; k <= n; k++ {
			var na, nb []string
			for _, r := range (Shard{k, n}).Select(ra) {
				na = append(na, r.Name)
			}
			for _, r := range (Shard{k, n}).Select(rb) {
				nb = append(nb, r.Name)
			}
			if !slices.Equal(na, nb) {
				t.Errorf("slice %d/%d: %v, then %v", k, n, na, nb)
			}
		}
	}
}

func TestParseShard(t *testing.T) {
	for _, tc := range []struct {
		in string
		ok bool
	}{{"1/1", true}, {"3/8", true}, {"8/8", true}, {"0/8", false}, {"9/8", false}, {"1/0", false}, {"a/b", false}, {"3", false}, {"-1/2", false}} {
		_, err := ParseShard(tc.in)
		if (err == nil) != tc.ok {
			t.Errorf("ParseShard(%q): %v", tc.in, err)
		}
	}
}

// writeFiles writes name → content into a new folder and returns it.
func writeFiles(t *testing.T, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, text := range files {
		p := filepath.Join(dir, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// input01 is the first test input (molecules and reaction only).
func input01(t *testing.T) string {
	b, err := os.ReadFile(filepath.Join(testdata, "inputs", "r01.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

const sharedSettings = `settings:
  bath: {gas: Ar}
  energy-transfer: {model: exponential-down, alpha-300: 250 cm-1, alpha-exponent: 0.85}
  grid:
    temperatures: {from: 800 K, to: 1400 K, points: 5}
    pressures: {from: 0.1 bar, to: 10 bar, points: 5}
`

// Shared settings fill exactly the sections an input lacks; the input's
// own text is kept byte for byte (so its line numbers hold), and the input
// reader reads the result. Checked against the sections written in the
// manifest (exact).
func TestApplySettings(t *testing.T) {
	in := input01(t)
	own := in + "grid:\n  temperatures: {from: 500 K, to: 900 K, points: 3}\n  pressures: {from: 1 bar, to: 2 bar, points: 2}\n"
	dir := writeFiles(t, map[string]string{
		"a.yaml": in, "b.yaml": own,
		"m.yaml": "inputs: [a.yaml, b.yaml]\n" + sharedSettings,
	})
	m, err := ReadManifest(filepath.Join(dir, "m.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	rs := m.Resolve()
	for _, tc := range []struct {
		r       *Resolved
		src     string
		applied []string
		temps   []float64
	}{
		{rs[0], in, []string{"bath", "energy-transfer", "grid"}, []float64{800, 1400}},
		{rs[1], own, []string{"bath", "energy-transfer"}, []float64{500, 900}},
	} {
		if tc.r.Err != nil {
			t.Fatal(tc.r.Err)
		}
		if !bytes.HasPrefix(tc.r.Text, []byte(tc.src)) {
			t.Errorf("%s: the resolved text does not start with the file's text", tc.r.Name)
		}
		if !slices.Equal(tc.r.Applied, tc.applied) {
			t.Errorf("%s: applied %v, want %v", tc.r.Name, tc.r.Applied, tc.applied)
		}
		mod, err := input.Parse(tc.r.Input, tc.r.Text)
		if err != nil {
			t.Fatalf("%s: %v\n%s", tc.r.Name, err, tc.r.Text)
		}
		ts := mod.Temperatures
		if ts[0] != tc.temps[0] || ts[len(ts)-1] != tc.temps[1] {
			t.Errorf("%s: temperatures %v, want %v … %v", tc.r.Name, ts, tc.temps[0], tc.temps[1])
		}
	}
}

// An input written as one flow mapping cannot take a block appended: the
// merged document is encoded anew and reads the same.
func TestApplySettingsFlowInput(t *testing.T) {
	var sections []Section
	m, err := ParseManifest("m.yaml", []byte("inputs: [x.yaml]\n"+sharedSettings))
	if err != nil {
		t.Fatal(err)
	}
	sections = m.Settings
	text := []byte("{title: t, bath: {gas: N2}}")
	out, applied, _, re := applySettings(text, sections)
	if !re || !slices.Equal(applied, []string{"energy-transfer", "grid"}) {
		t.Fatalf("re-encoded %v, applied %v", re, applied)
	}
	if !bytes.Contains(out, []byte("gas: N2")) || !bytes.Contains(out, []byte("alpha-300: 250 cm-1")) {
		t.Errorf("merged text:\n%s", out)
	}
}

// A mistake in a shared setting is reported at its line in the manifest,
// with the input it was applied to; a mistake in the input at the input's
// own line.
func TestMapError(t *testing.T) {
	bad := strings.Replace(sharedSettings, "from: 800 K", "from: 800 Q", 1)
	in := input01(t)
	dir := writeFiles(t, map[string]string{"a.yaml": in, "m.yaml": "inputs: [a.yaml]\n" + bad})
	m, err := ReadManifest(filepath.Join(dir, "m.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	r := m.Resolve()[0]
	_, err = input.Parse(r.Input, r.Text)
	if err == nil {
		t.Fatal("a bad unit in the shared grid was accepted")
	}
	var fe *input.FieldError
	if !errors.As(r.MapError(err), &fe) {
		t.Fatalf("%v is not a FieldError", err)
	}
	// Line 6 of the manifest: inputs, settings, bath, energy-transfer,
	// grid, temperatures.
	if fe.File != m.File || fe.Line != 6 || fe.Path != "settings.grid.temperatures.from" || !strings.Contains(fe.Error(), "a.yaml") {
		t.Errorf("got %q (file %s line %d path %s)", fe.Error(), fe.File, fe.Line, fe.Path)
	}

	// The input's own mistake keeps its file and line.
	inBad := strings.Replace(in, "mass: 70.09 amu", "mass: 70.09 amq", 1)
	line := strings.Count(in[:strings.Index(in, "mass:")], "\n") + 1
	dir = writeFiles(t, map[string]string{"a.yaml": inBad, "m.yaml": "inputs: [a.yaml]\n" + sharedSettings})
	m, _ = ReadManifest(filepath.Join(dir, "m.yaml"))
	r = m.Resolve()[0]
	_, err = input.Parse(r.Input, r.Text)
	if !errors.As(r.MapError(err), &fe) || fe.File != r.Input || fe.Line != line {
		t.Errorf("own mistake: %v (want %s line %d)", err, r.Input, line)
	}
}

// Manifest mistakes are refused before any work, each naming the line.
func TestManifestErrors(t *testing.T) {
	in := input01(t)
	for _, tc := range []struct{ name, manifest, want string }{
		{"unknown key", "inputs: [a.yaml]\nbogus: 1\n", `m.yaml:2: bogus: unknown key`},
		{"not shareable", "inputs: [a.yaml]\nsettings:\n  molecules: {}\n", `m.yaml:3: settings.molecules: not a section a manifest can share`},
		{"glob matches nothing", "inputs: [nothing/*.yaml]\n", `m.yaml:1: inputs[0]: "nothing/*.yaml": matches no file`},
		{"same name twice", "inputs: [a.yaml, {file: b/a.yaml}]\n", `a second reaction named "a"`},
		{"units per entry", "inputs: [{file: a.yaml, options: {energy-unit: kJ/mol}}]\n", `inputs[0].options.energy-unit: not an option here`},
		{"no inputs", "settings: {bath: {gas: Ar}}\n", `inputs: missing or empty`},
		{"not a mapping", "- a.yaml\n", `the top level is not a mapping`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := writeFiles(t, map[string]string{"a.yaml": in, "b/a.yaml": in, "m.yaml": tc.manifest})
			_, err := ReadManifest(filepath.Join(dir, "m.yaml"))
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got %v, want %q", err, tc.want)
			}
		})
	}
}

// The key changes with what changes a reaction's result (its input text,
// a shared section it takes, its options) and with nothing else: a shared
// section the input overrides leaves it alone. Each case rewrites the
// files in one folder, so the paths (part of the key) stay the same.
func TestKeys(t *testing.T) {
	in := input01(t)
	own := in + "energy-transfer: {model: strong-collider}\n"
	base := "inputs: [a.yaml, b.yaml]\n" + sharedSettings + "options: {tolerance: 5}\n"
	dir := t.TempDir()
	keys := func(manifest, a string) []string {
		for name, text := range map[string]string{"a.yaml": a, "b.yaml": own, "m.yaml": manifest} {
			if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		m, err := ReadManifest(filepath.Join(dir, "m.yaml"))
		if err != nil {
			t.Fatal(err)
		}
		var out []string
		for _, r := range m.Resolve() {
			out = append(out, r.Key)
		}
		return out
	}
	k0 := keys(base, in)
	if k0[0] == k0[1] {
		t.Error("two inputs share a key")
	}
	for _, tc := range []struct {
		name        string
		manifest, a string
		changed     [2]bool // a's key, b's key
	}{
		{"nothing", base, in, [2]bool{false, false}},
		{"input text", base, in + "# a comment\n", [2]bool{true, false}},
		{"shared grid", strings.Replace(base, "points: 5}\n    pressures", "points: 6}\n    pressures", 1), in, [2]bool{true, true}},
		{"transfer that b overrides", strings.Replace(base, "alpha-300: 250 cm-1", "alpha-300: 300 cm-1", 1), in, [2]bool{true, false}},
		{"option", strings.Replace(base, "tolerance: 5", "tolerance: 4", 1), in, [2]bool{true, true}},
		{"title", "title: another\n" + base, in, [2]bool{false, false}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			k := keys(tc.manifest, tc.a)
			for i := range k {
				if (k[i] != k0[i]) != tc.changed[i] {
					t.Errorf("reaction %d: key changed %v, want %v", i, k[i] != k0[i], tc.changed[i])
				}
			}
		})
	}
}

// fakeRecord is what a fake Compute returns: a done record of r.
func fakeRecord(r *Resolved) *Record {
	return &Record{Format: recordFormat, Name: r.Name, Input: r.Input, Key: r.Key, Status: StatusDone}
}

// Run: a failing reaction does not stop the others and is recorded failed
// with its code; a re-run computes only what is not done (failures again);
// --force computes all. Counts are exact.
func TestRunFailuresAndResume(t *testing.T) {
	rs := make([]*Resolved, 9)
	for i := range rs {
		rs[i] = &Resolved{Reaction: Reaction{Name: fmt.Sprintf("r%d", i)}, Index: i, Key: fmt.Sprint("k", i)}
	}
	store := Store{Dir: t.TempDir()}
	var calls atomic.Int32
	compute := func(ctx context.Context, r *Resolved) (*Record, error) {
		calls.Add(1)
		if r.Name == "r4" {
			return nil, errors.New("r4.yaml:3: broken")
		}
		if r.Name == "r6" {
			panic("a defect")
		}
		return fakeRecord(r), nil
	}
	rep, err := Run(context.Background(), store, rs, compute, RunOptions{Workers: 3, Code: func(error) int { return 7 }})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Computed != 7 || rep.Failed != 2 || calls.Load() != 9 {
		t.Fatalf("computed %d failed %d calls %d", rep.Computed, rep.Failed, calls.Load())
	}
	if rec := store.Read("r4"); rec == nil || rec.Status != StatusFailed || rec.ExitCode != 7 || rec.Error != "r4.yaml:3: broken" {
		t.Errorf("r4's record: %+v", rec)
	}
	if rec := store.Read("r6"); rec == nil || rec.Status != StatusFailed || !strings.Contains(rec.Error, "a defect") {
		t.Errorf("r6's record: %+v", rec)
	}
	calls.Store(0)
	rep, err = Run(context.Background(), store, rs, compute, RunOptions{Workers: 2})
	if err != nil || rep.Computed != 0 || rep.UpToDate != 7 || rep.Failed != 2 || calls.Load() != 2 {
		t.Errorf("re-run: %+v, %v, %d calls", rep, err, calls.Load())
	}
	rs[2].Key = "changed"
	calls.Store(0)
	rep, _ = Run(context.Background(), store, rs, compute, RunOptions{Workers: 2})
	if rep.Computed != 1 || calls.Load() != 3 {
		t.Errorf("after a change: computed %d, %d calls", rep.Computed, calls.Load())
	}
	calls.Store(0)
	rep, _ = Run(context.Background(), store, rs, compute, RunOptions{Workers: 2, Force: true})
	if rep.Computed != 7 || calls.Load() != 9 {
		t.Errorf("forced: computed %d, %d calls", rep.Computed, calls.Load())
	}
}

// A cancelled run keeps what finished and records nothing for the
// reactions in flight; the next run computes exactly those left.
func TestRunCancelled(t *testing.T) {
	rs := make([]*Resolved, 8)
	for i := range rs {
		rs[i] = &Resolved{Reaction: Reaction{Name: fmt.Sprintf("r%d", i)}, Index: i, Key: "k"}
	}
	store := Store{Dir: t.TempDir()}
	ctx, cancel := context.WithCancel(context.Background())
	compute := func(ctx context.Context, r *Resolved) (*Record, error) {
		if r.Index == 3 {
			cancel() // Ctrl-C while r3 is in flight
			<-ctx.Done()
			return nil, ctx.Err()
		}
		return fakeRecord(r), nil
	}
	rep, err := Run(ctx, store, rs, compute, RunOptions{Workers: 1})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err %v", err)
	}
	if rep.Computed != 3 || len(rep.Pending) != 5 {
		t.Fatalf("computed %d, pending %v", rep.Computed, rep.Pending)
	}
	if store.Read("r3") != nil {
		t.Error("the reaction in flight was recorded")
	}
	var n atomic.Int32
	rep, err = Run(context.Background(), store, rs, func(ctx context.Context, r *Resolved) (*Record, error) {
		n.Add(1)
		return fakeRecord(r), nil
	}, RunOptions{Workers: 2})
	if err != nil || rep.Computed != 5 || rep.UpToDate != 3 || n.Load() != 5 {
		t.Errorf("resume: %+v %v (%d computed)", rep, err, n.Load())
	}
}

// Collect refuses while a reaction is missing or stale, naming it and its
// slice; with every record up to date it returns them in order.
func TestCollect(t *testing.T) {
	m := &Manifest{File: "m.yaml"}
	rs := make([]*Resolved, 6)
	for i := range rs {
		rs[i] = &Resolved{Reaction: Reaction{Name: fmt.Sprintf("r%d", i)}, Index: i, Key: "k"}
	}
	store := Store{Dir: t.TempDir()}
	for _, r := range rs {
		if r.Index == 2 {
			continue // slice 3/3 never ran
		}
		rec := fakeRecord(r)
		rec.Shard = Shard{Of(r.Index, 3), 3}.String()
		if r.Index == 4 {
			rec.Key = "old"
		}
		if err := store.Write(rec); err != nil {
			t.Fatal(err)
		}
	}
	_, err := Collect(m, store, rs)
	var nf *NotFinishedError
	if !errors.As(err, &nf) {
		t.Fatalf("got %v", err)
	}
	if !slices.Equal(nf.Missing, []string{"r2 (slice 3/3)"}) || !slices.Equal(nf.Stale, []string{"r4 (slice 2/3)"}) || !slices.Equal(nf.Slices, []string{"2/3", "3/3"}) {
		t.Errorf("%+v", nf)
	}
	if !strings.Contains(err.Error(), "--shard K/N") {
		t.Errorf("message without the hint: %v", err)
	}
	for _, r := range rs[2:5] {
		rec := fakeRecord(r)
		if err := store.Write(rec); err != nil {
			t.Fatal(err)
		}
	}
	recs, err := Collect(m, store, rs)
	if err != nil || len(recs) != 6 || recs[5].Name != "r5" {
		t.Errorf("%v %v", recs, err)
	}
}

// A damaged record (a file cut short by hand) counts as missing: the
// reaction runs again rather than the batch failing.
func TestDamagedRecord(t *testing.T) {
	store := Store{Dir: t.TempDir()}
	r := &Resolved{Reaction: Reaction{Name: "r"}, Key: "k"}
	if err := os.WriteFile(store.path("r"), []byte(`{"format": 1, "name": "r", "ke`), 0o644); err != nil {
		t.Fatal(err)
	}
	if st, _ := store.StateOf(r); st != Missing {
		t.Errorf("state %v", st)
	}
}
