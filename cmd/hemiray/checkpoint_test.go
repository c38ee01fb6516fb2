package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"syscall"
	"testing"

	"github.com/hemiray/hemiray/raytrace/analysis"
	"time"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// TestMain lets tests run the command in a subprocess: the test binary
// re-executes itself as hemiray when HEMIRAY_TEST_MAIN is set.
func TestMain(m *testing.M) {
	if os.Getenv("HEMIRAY_TEST_MAIN") == "1" {
		os.Args = append([]string{"hemiray"}, os.Args[1:]...)
		main()
	}
	os.Exit(m.Run())
}

func hemirayCmd(args ...string) *exec.Cmd {
	cmd := exec.Command(os.Args[0], args...)
	cmd.Env = append(os.Environ(), "HEMIRAY_TEST_MAIN=1")
	return cmd
}

// writeBox writes a closed, inward box of 6 surfaces as OBJ.
func writeBox(t *testing.T, dir string) string {
	t.Helper()
	p := filepath.Join(dir, "box.obj")
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := mesh.WriteOBJ(f, mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 2, Z: 0.5}}, 24, true)); err != nil {
		t.Fatal(err)
	}
	return p
}

var compared = []string{"viewfactors.csv", "viewfactors_halfwidth.csv", "viewfactors_pairs.csv", "viewfactors.mtx", "nodes.csv", "tallies.csv", "tallies.bin"}

func sameOutputs(t *testing.T, a, b string) {
	t.Helper()
	for _, f := range compared {
		if !sameFile(filepath.Join(a, f), filepath.Join(b, f)) {
			t.Errorf("%s differs between %s and %s", f, a, b)
		}
	}
}

// sameFile compares two result files byte for byte; tally files, whose
// stored paths are relative to their own folder, by their counts and
// their record with the paths resolved.
func sameFile(a, b string) bool {
	if filepath.Base(a) == "tallies.bin" {
		ca, ra, err1 := analysis.ReadTallies(a)
		cb, rb, err2 := analysis.ReadTallies(b)
		return err1 == nil && err2 == nil && reflect.DeepEqual(ca, cb) && reflect.DeepEqual(ra, rb)
	}
	x, err1 := os.ReadFile(a)
	y, err2 := os.ReadFile(b)
	return err1 == nil && err2 == nil && bytes.Equal(x, y)
}

// A trace killed with SIGKILL at random moments and resumed gives the
// uninterrupted run's files, byte for byte.
func TestKillAndResume(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the tracer in subprocesses for several seconds")
	}
	dir := t.TempDir()
	box := writeBox(t, dir)
	args := []string{"trace", box, "--rays", "200000", "--seed", "5", "--quiet", "--checkpoint-every", "20ms"}
	ref := filepath.Join(dir, "ref")
	if out, err := hemirayCmd(append(args, "-o", ref)...).CombinedOutput(); err != nil {
		t.Fatalf("reference run: %v\n%s", err, out)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for k := range 3 {
		out := filepath.Join(dir, "killed", string(rune('a'+k)))
		cmd := hemirayCmd(append(args, "-o", out)...)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(time.Duration(100+rng.IntN(500)) * time.Millisecond)
		cmd.Process.Kill()
		cmd.Wait()
		res, err := hemirayCmd(append(args, "-o", out, "--resume")...).CombinedOutput()
		if err != nil {
			t.Fatalf("resume %d: %v\n%s", k, err, res)
		}
		sameOutputs(t, ref, out)
	}
}

// SIGTERM (what a batch scheduler sends before its time limit) writes a
// checkpoint before the process exits.
func TestSigtermWritesCheckpoint(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the tracer in a subprocess")
	}
	dir := t.TempDir()
	box := writeBox(t, dir)
	out := filepath.Join(dir, "out")
	cmd := hemirayCmd("trace", box, "--rays", "2000000", "--quiet", "--checkpoint-every", "1h", "-o", out)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(700 * time.Millisecond)
	cmd.Process.Signal(syscall.SIGTERM)
	err := cmd.Wait()
	if err == nil || !strings.Contains(stderr.String(), "checkpoint written") {
		t.Fatalf("exit %v, stderr %q", err, stderr.String())
	}
	if _, _, err := analysis.ReadTallies(out); err != nil {
		t.Fatalf("checkpoint after SIGTERM: %v", err)
	}
}

// Resuming with another seed or a changed mesh is refused, naming the change;
// a corrupted checkpoint is a clear error.
func TestResumeRefusesChanges(t *testing.T) {
	dir := t.TempDir()
	box := writeBox(t, dir)
	out := filepath.Join(dir, "out")
	if code, _, e := runCLI("trace", box, "--rays", "2000", "--quiet", "-o", out); code != 0 {
		t.Fatal(e)
	}
	code, _, e := runCLI("trace", box, "--rays", "2000", "--seed", "9", "--quiet", "--resume", "-o", out)
	if code != 1 || !strings.Contains(e, "seed changed from 1 to 9") {
		t.Errorf("seed change: exit %d, %q", code, e)
	}
	os.WriteFile(box, append(mustRead(t, box), []byte("v 9 9 9\n")...), 0o644)
	code, _, e = runCLI("trace", box, "--rays", "2000", "--quiet", "--resume", "-o", out)
	if code != 1 || !strings.Contains(e, "box.obj has changed") {
		t.Errorf("mesh change: exit %d, %q", code, e)
	}
	ck := filepath.Join(out, "tallies.bin")
	b := mustRead(t, ck)
	os.WriteFile(ck, b[:len(b)/2], 0o644)
	code, _, e = runCLI("merge", "-o", filepath.Join(dir, "m"), out)
	if code != 1 || !strings.Contains(e, "not a valid hemiray tally file") || strings.Contains(e, "panic") {
		t.Errorf("truncated tallies: exit %d, %q", code, e)
	}
}

func mustRead(t *testing.T, p string) []byte {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// Shards 1/1 … 7/7 merged give the single run's files; shards of another
// seed are refused.
func TestShardMergeCLI(t *testing.T) {
	dir := t.TempDir()
	box := writeBox(t, dir)
	args := []string{"trace", box, "--rays", "30000", "--quiet"}
	single := filepath.Join(dir, "single")
	if code, _, e := runCLI(append(args, "-o", single)...); code != 0 {
		t.Fatal(e)
	}
	for n := 1; n <= 7; n++ {
		var parts []string
		for i := range n {
			p := filepath.Join(dir, "parts", string(rune('0'+n)), string(rune('0'+i)))
			if code, _, e := runCLI(append(args, "--shard", string(rune('0'+i))+"/"+string(rune('0'+n)), "-o", p)...); code != 0 {
				t.Fatal(e)
			}
			parts = append(parts, p)
		}
		merged := filepath.Join(dir, "merged", string(rune('0'+n)))
		if code, _, e := runCLI(append([]string{"merge", "-o", merged}, parts...)...); code != 0 {
			t.Fatalf("merge of %d: %s", n, e)
		}
		sameOutputs(t, single, merged)
	}
	other := filepath.Join(dir, "other")
	runCLI(append(args, "--seed", "2", "--shard", "1/2", "-o", other)...)
	code, _, e := runCLI("merge", "-o", filepath.Join(dir, "bad"), filepath.Join(dir, "parts", "2", "0"), other)
	if code != 1 || !strings.Contains(e, "not shards of one run") {
		t.Errorf("mismatched shards: exit %d, %q", code, e)
	}
}

// --time-limit stops cleanly, writes the precision reached and flags it.
func TestTimeLimit(t *testing.T) {
	dir := t.TempDir()
	box := writeBox(t, dir)
	out := filepath.Join(dir, "out")
	code, _, e := runCLI("trace", box, "--rays", "50000000", "--time-limit", "1s", "--quiet", "-o", out)
	if code != 0 || !strings.Contains(e, "time limit") {
		t.Fatalf("exit %d, %q", code, e)
	}
	var s struct {
		Complete   bool  `json:"complete"`
		RaysTraced int64 `json:"rays_traced"`
	}
	if err := json.Unmarshal(mustRead(t, filepath.Join(out, "summary.json")), &s); err != nil {
		t.Fatal(err)
	}
	if s.Complete || s.RaysTraced == 0 || s.RaysTraced >= 6*50000000 {
		t.Errorf("summary after the time limit: complete %v, %d rays", s.Complete, s.RaysTraced)
	}
}

// --halfwidth with shards: merge writes plan.json while intervals are too
// wide; shards rerun with --plan --resume; the end equals a single run.
func TestShardHalfWidthRounds(t *testing.T) {
	dir := t.TempDir()
	stl, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	args := []string{"trace", stl, "--rays", "2000", "--halfwidth", "0.006", "--quiet"}
	single := filepath.Join(dir, "single")
	if code, _, e := runCLI(append(args, "-o", single)...); code != 0 {
		t.Fatal(e)
	}
	parts := []string{filepath.Join(dir, "p0"), filepath.Join(dir, "p1")}
	merged := filepath.Join(dir, "m")
	plan := filepath.Join(merged, "plan.json")
	for round := 0; ; round++ {
		for i, p := range parts {
			a := append(args, "--shard", []string{"0/2", "1/2"}[i], "-o", p)
			if round > 0 {
				a = append(a, "--plan", plan, "--resume")
			}
			if code, _, e := runCLI(a...); code != 0 {
				t.Fatalf("round %d shard %d: %s", round, i, e)
			}
		}
		if code, _, e := runCLI("merge", "-o", merged, parts[0], parts[1]); code != 0 {
			t.Fatalf("merge round %d: %s", round, e)
		}
		if _, err := os.Stat(plan); err != nil {
			break
		}
		if round > 8 {
			t.Fatal("rounds do not end")
		}
	}
	sameOutputs(t, single, merged)
}

// Completeness comes from the plan: solve on the checkpoint of a run that a
// time limit stopped says INCOMPLETE on the console and complete = false in
// summary.json; a --halfwidth run stopped by --max-rays names the rows that
// missed the target.
func TestIncompleteAndMissedTargets(t *testing.T) {
	dir := t.TempDir()
	box := writeBox(t, dir)
	cs := filepath.Join(dir, "c.toml")
	os.WriteFile(cs, []byte("[model]\nfiles = [\""+box+"\"]\n[defaults]\nemissivity = 0.5\ntemperature = 300\n[surfaces.zmin]\ntemperature = 400\n"), 0o644)
	out := filepath.Join(dir, "out")
	code, _, e := runCLI("run", cs, "--rays", "50000000", "--time-limit", "3s", "--quiet", "--no-pictures", "-o", out)
	if code != 0 {
		t.Fatalf("run: exit %d, %s", code, e)
	}
	code, _, e = runCLI("solve", cs, "--rays", "50000000", "--no-pictures", "-o", out)
	var s struct {
		Complete bool `json:"complete"`
		Missed   []struct {
			Node string `json:"node"`
		} `json:"halfwidth_missed"`
	}
	if err := json.Unmarshal(mustRead(t, filepath.Join(out, "summary.json")), &s); err != nil {
		t.Fatal(err)
	}
	if code != 0 || !strings.Contains(e, "INCOMPLETE") || s.Complete {
		t.Errorf("solve of an interrupted run: exit %d, complete %v, stderr %q", code, s.Complete, e)
	}
	hw := filepath.Join(dir, "hw")
	code, _, e = runCLI("trace", box, "--rays", "1000", "--halfwidth", "0.002", "--max-rays", "2000", "--quiet", "-o", hw)
	if err := json.Unmarshal(mustRead(t, filepath.Join(hw, "summary.json")), &s); err != nil {
		t.Fatal(err)
	}
	if code != 0 || !strings.Contains(e, "did not reach the half-width target 0.002") || len(s.Missed) != 6 || !s.Complete {
		t.Errorf("--halfwidth stopped by --max-rays: exit %d, %d rows listed, complete %v, stderr %q", code, len(s.Missed), s.Complete, e)
	}
}

// Two runs into one folder: the second is refused at once, naming the
// first, instead of leaving a mix of both; merging into one of the shard
// folders is refused too.
func TestOutputFolderLocked(t *testing.T) {
	dir := t.TempDir()
	box := writeBox(t, dir)
	out := filepath.Join(dir, "out")
	first := hemirayCmd("trace", box, "--rays", "50000000", "--quiet", "--time-limit", "20s", "-o", out)
	if err := first.Start(); err != nil {
		t.Fatal(err)
	}
	defer func() { first.Process.Signal(syscall.SIGTERM); first.Wait() }()
	for range 100 { // wait for the first to take the folder
		if b, _ := os.ReadFile(filepath.Join(out, ".hemiray.lock")); len(b) > 0 {
			break
		}
		time.Sleep(50 * time.Millisecond)
	}
	code, _, e := runCLI("trace", box, "--rays", "1000", "--quiet", "-o", out)
	if code != 1 || !strings.Contains(e, "in use") || !strings.Contains(e, fmt.Sprintf("pid %d", first.Process.Pid)) {
		t.Errorf("second run into a busy folder: exit %d, %q", code, e)
	}
	part := filepath.Join(dir, "p0")
	if code, _, e := runCLI("trace", box, "--rays", "1000", "--quiet", "--shard", "0/1", "-o", part); code != 0 {
		t.Fatal(e)
	}
	if code, _, e := runCLI("merge", "-o", part, part); code != 1 || !strings.Contains(e, "also a shard") {
		t.Errorf("merge into its own input: exit %d, %q", code, e)
	}
}

// A project folder moved after tracing (or mounted elsewhere on a cluster)
// still resumes and merges: tally files store paths relative to their
// folder, and compare files by name and content.
func TestMovedProjectResumesAndMerges(t *testing.T) {
	root := t.TempDir()
	proj := filepath.Join(root, "a")
	os.Mkdir(proj, 0o755)
	writeBox(t, proj)
	os.WriteFile(filepath.Join(proj, "c.toml"), []byte("[model]\nfiles = [\"box.obj\"]\n[rays]\nper_node = 4000\n"), 0o644)
	for i := range 2 {
		part := filepath.Join(proj, "parts", fmt.Sprint(i))
		if code, _, e := runCLI("trace", filepath.Join(proj, "c.toml"), "--shard", fmt.Sprintf("%d/2", i), "--quiet", "-o", part); code != 0 {
			t.Fatal(e)
		}
	}
	moved := filepath.Join(root, "b")
	if err := os.Rename(proj, moved); err != nil {
		t.Fatal(err)
	}
	part0 := filepath.Join(moved, "parts", "0")
	if code, _, e := runCLI("trace", filepath.Join(moved, "c.toml"), "--shard", "0/2", "--resume", "--quiet", "-o", part0); code != 0 {
		t.Errorf("resume after the move: exit %d, %q", code, e)
	}
	if code, _, e := runCLI("merge", "-o", filepath.Join(moved, "results"), part0, filepath.Join(moved, "parts", "1")); code != 0 {
		t.Errorf("merge after the move: exit %d, %q", code, e)
	}
}
