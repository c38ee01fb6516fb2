package main

import (
	"bytes"
	"encoding/csv"
	"encoding/xml"
	"fmt"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// readCSV reads a whole CSV file, header first.
func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

// readSurfaces reads surfaces.csv into node → column → value.
func readSurfaces(t *testing.T, path string) map[string]map[string]string {
	t.Helper()
	recs := readCSV(t, path)
	out := map[string]map[string]string{}
	for _, r := range recs[1:] {
		row := map[string]string{}
		for k, h := range recs[0] {
			row[h] = r[k]
		}
		out[r[0]] = row
	}
	return out
}

func val(t *testing.T, s string) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("not a number: %q", s)
	}
	return x
}

// The whole pipeline on tessellated concentric spheres, from a hand-written
// case file: the heat flow must match the closed form for concentric
// spheres, Q = σA1(T1⁴ − T2⁴)/(1/ε1 + (A1/A2)(1/ε2 − 1)) (Incropera &
// DeWitt eq. 13.24), within its reported interval plus the tessellation
// effect, which is evaluated exactly by using the facetted areas in the
// closed form (A1/A2 of the polyhedra is their exact view factor ratio).
func TestRunConcentricSpheres(t *testing.T) {
	dir := t.TempDir()
	inner := mesh.Sphere("inner", geometry.Vec3{}, 0.1, 10, false)
	outer := mesh.Sphere("outer", geometry.Vec3{}, 0.2, 10, true)
	for name, m := range map[string]*mesh.Mesh{"inner.stl": inner, "outer.stl": outer} {
		f, _ := os.Create(filepath.Join(dir, name))
		if err := mesh.WriteSTL(f, m, strings.TrimSuffix(name, ".stl")); err != nil {
			t.Fatal(err)
		}
		f.Close()
	}
	caseText := `[model]
files = ["inner.stl", "outer.stl"]
[rays]
per_node = 100000
seed = 11
replicates = 8
[surfaces.inner]
emissivity = 0.3
temperature = 700
[surfaces.outer]
emissivity = 0.6
temperature = 300
`
	os.WriteFile(filepath.Join(dir, "spheres.toml"), []byte(caseText), 0o644)
	code, out, errOut := runCLI("run", filepath.Join(dir, "spheres.toml"), "--quiet", "-o", filepath.Join(dir, "out"))
	if code != 0 {
		t.Fatalf("run: exit %d\n%s\n%s", code, out, errOut)
	}
	s := readSurfaces(t, filepath.Join(dir, "out", "surfaces.csv"))
	a1, a2 := inner.TotalArea(), outer.TotalArea()
	want := exchange.Sigma * a1 * (math.Pow(700, 4) - math.Pow(300, 4)) / (1/0.3 + a1/a2*(1/0.6-1))
	q, hw := val(t, s["inner"]["Q_W"]), val(t, s["inner"]["Q_halfwidth_W"])
	// F(inner→outer) = 1 exactly here, so only F_22 is estimated; the
	// interval must cover the truth (allow 2 half-widths: a 95 % interval
	// misses one time in twenty).
	if math.Abs(q-want) > 2*hw+1e-9*want {
		t.Errorf("Q(inner) = %.6g ± %.3g W, closed form %.6g W", q, hw, want)
	}
	if got := val(t, s["outer"]["Q_W"]); math.Abs(got+q) > 1e-9*want {
		t.Errorf("energy balance: Q(outer) = %v, Q(inner) = %v", got, q)
	}
	for _, f := range []string{"viewfactors_smoothed.csv", "conductances.csv", "tallies.csv", "summary.json", "viewfactors_smoothed_pairs.csv"} {
		if _, err := os.Stat(filepath.Join(dir, "out", f)); err != nil {
			t.Errorf("missing %s", f)
		}
	}
	// solve with a changed temperature reuses the tallies without tracing.
	os.WriteFile(filepath.Join(dir, "spheres.toml"), []byte(strings.Replace(caseText, "temperature = 700", "temperature = 900", 1)), 0o644)
	code, out, errOut = runCLI("solve", filepath.Join(dir, "spheres.toml"), "--quiet", "-o", filepath.Join(dir, "out"))
	if code != 0 {
		t.Fatalf("solve: exit %d\n%s\n%s", code, out, errOut)
	}
	s = readSurfaces(t, filepath.Join(dir, "out", "surfaces.csv"))
	want = exchange.Sigma * a1 * (math.Pow(900, 4) - math.Pow(300, 4)) / (1/0.3 + a1/a2*(1/0.6-1))
	if q := val(t, s["inner"]["Q_W"]); math.Abs(q-want) > 2*val(t, s["inner"]["Q_halfwidth_W"])+1e-9*want {
		t.Errorf("solve: Q(inner) = %v, closed form %v", q, want)
	}
	// A changed ray setting is refused.
	os.WriteFile(filepath.Join(dir, "spheres.toml"), []byte(strings.Replace(caseText, "seed = 11", "seed = 12", 1)), 0o644)
	if code, _, errOut := runCLI("solve", filepath.Join(dir, "spheres.toml"), "-o", filepath.Join(dir, "out")); code != 1 || !strings.Contains(errOut, "seed changed from 11 to 12") {
		t.Errorf("solve after a seed change: exit %d, %s", code, errOut)
	}
}

func TestRunNeedsConditions(t *testing.T) {
	dir := t.TempDir()
	mesh, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	p := filepath.Join(dir, "c.toml")
	os.WriteFile(p, []byte("[model]\nfiles = [\""+mesh+"\"]\n[defaults]\nemissivity = 0.5\n[surfaces.floor]\ntemperature = 400\n"), 0o644)
	code, _, errOut := runCLI("run", p, "--quiet", "-o", filepath.Join(dir, "o"))
	if code != 1 || !strings.Contains(errOut, "surface back_wall: no boundary condition") {
		t.Errorf("exit %d, %q", code, errOut)
	}
	// Open model without an ambient temperature.
	os.WriteFile(p, []byte("[model]\nfiles = [\""+mesh+"\"]\n[defaults]\nemissivity = 0.5\nadiabatic = true\n[surfaces.floor]\ntemperature = 400\n"), 0o644)
	code, _, errOut = runCLI("run", p, "--quiet", "--rays", "1000", "-o", filepath.Join(dir, "o"))
	if code != 1 || !strings.Contains(errOut, "[ambient] temperature") {
		t.Errorf("exit %d, %q", code, errOut)
	}
}

func TestDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("demo traces 3 million rays")
	}
	dir := t.TempDir()
	code, out, errOut := runCLI("demo", "-o", dir, "--quiet")
	if code != 0 {
		t.Fatalf("demo: exit %d\n%s\n%s", code, out, errOut)
	}
	s := readSurfaces(t, filepath.Join(dir, "results", "surfaces.csv"))
	// The board and module carry their fixed heat flows (15 W shared by the
	// board's two sides, 6 W), and the net heat balances (energy conservation).
	if b := val(t, s["board"]["Q_W"]) + val(t, s["board.back"]["Q_W"]); math.Abs(b-15) > 1e-9 {
		t.Errorf("board sides carry %v W, want 15", b)
	}
	if m := val(t, s["module"]["Q_W"]); math.Abs(m-6) > 1e-9 {
		t.Errorf("module carries %v W, want 6", m)
	}
	if !strings.Contains(out, "caution") || strings.Contains(errOut, "warning") {
		t.Errorf("demo output:\n%s\n%s", out, errOut)
	}
	// The pictures and the VTK file a person opens first.
	for _, f := range []string{"model_surfaces.png", "model_heatflux.png", "viewfactors_heatmap.png", "viewfactors_heatmap_log.png"} {
		img, err := png.Decode(bytes.NewReader(mustRead(t, filepath.Join(dir, "results", f))))
		if err != nil || img.Bounds().Dx() < 200 {
			t.Errorf("%s: %v", f, err)
		}
	}
	vtp := mustRead(t, filepath.Join(dir, "results", "model.vtp"))
	if err := xml.Unmarshal(vtp, new(struct{})); err != nil {
		t.Errorf("model.vtp: %v", err)
	}
	for _, a := range []string{`Name="surface_name"`, `Name="node_name"`, `Name="q_back_W_per_m2"`} {
		if !bytes.Contains(vtp, []byte(a)) {
			t.Errorf("model.vtp lacks the cell array %s", a)
		}
	}
}

// The second demo: the sun at two positions over an instrument with a
// window and a mirror-like shield. Each sun has its steady state; the
// insulated parts give off exactly the sunlight they absorb plus their own
// heat, so each state balances; under the high sun light reaches the
// detector through the window, under the low one the shield shades it.
func TestInstrumentDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("the demo traces 3.6 million rays")
	}
	dir := t.TempDir()
	code, out, errOut := runCLI("demo", "--scenario", "instrument", "-o", dir, "--quiet")
	if code != 0 {
		t.Fatalf("demo: exit %d\n%s\n%s", code, out, errOut)
	}
	res := filepath.Join(dir, "results")
	solar := readSurfaces(t, filepath.Join(res, "solar.csv"))
	if w := val(t, solar["detector"]["high_W"]); !(w > 1) {
		t.Errorf("the detector absorbs %v W under the high sun", w)
	}
	if w := val(t, solar["detector"]["low_W"]); w > 0.01 {
		t.Errorf("the detector absorbs %v W under the shaded low sun", w)
	}
	for _, sun := range []string{"low", "high"} {
		s := readSurfaces(t, filepath.Join(res, "surfaces_"+sun+".csv"))
		if q := val(t, s["detector"]["Q_W"]); math.Abs(q-2) > 1e-9 {
			t.Errorf("%s: the detector carries %v W, want 2", sun, q)
		}
		if q := val(t, s["shield"]["Q_W"]) + val(t, s["shield.back"]["Q_W"]); math.Abs(q) > 1e-9 {
			t.Errorf("%s: the insulated shield gives off %v W net", sun, q)
		}
	}
	for _, f := range []string{"absorption_smoothed.csv", "conductances.csv", "model_solar_low.png", "model_solar_high.png"} {
		if _, err := os.Stat(filepath.Join(res, f)); err != nil {
			t.Errorf("missing %s", f)
		}
	}
	if vtp := mustRead(t, filepath.Join(res, "model.vtp")); !bytes.Contains(vtp, []byte(`Name="solar_high_W_per_m2"`)) {
		t.Error("model.vtp lacks the high sun's absorbed flux")
	}
}

// render draws a model by surface with the requested size, and by a result
// field from a results folder.
func TestRenderCommand(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "side.png")
	code, _, e := runCLI("render", "../../testdata/duct_bend.obj", "--color", "side", "--size", "300x200", "--view", "+z", "-o", out)
	if code != 0 {
		t.Fatal(e)
	}
	img, err := png.Decode(bytes.NewReader(mustRead(t, out)))
	if err != nil || img.Bounds().Dx() != 300 || img.Bounds().Dy() != 200 {
		t.Fatalf("side.png: %v %v", err, img.Bounds())
	}
	if code, _, e := runCLI("render", "../../testdata/duct_bend.obj", "--color", "temperature", "--results", dir, "-o", out); code != 1 || !strings.Contains(e, "surfaces.csv") {
		t.Errorf("field without results: exit %d, %q", code, e)
	}
	if code, _, e := runCLI("render", "../../testdata/duct_bend.obj", "--color", "rainbow", "-o", out); code != 2 || !strings.Contains(e, "--color") {
		t.Errorf("bad colouring: exit %d, %q", code, e)
	}
	// A size whose product overflows an int is refused, not allocated.
	if code, _, e := runCLI("render", "../../testdata/duct_bend.obj", "--size", "4294967296x4294967296", "-o", out); code != 2 || !strings.Contains(e, "--size") {
		t.Errorf("overflowing size: exit %d, %q", code, e)
	}
}

// solve --viewfactors with factors given by hand: concentric spheres, whose
// exact matrix for the facetted shapes is F(inner→outer) = 1,
// F(outer→inner) = A1/A2, F(outer→outer) = 1 − A1/A2. The heat flow must be
// the closed form of a two-surface enclosure to round-off (Incropera &
// DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., eq. 13.20;
// from memory), in both file layouts. And the raw matrix a run traced,
// solved again from its viewfactors.csv, gives the run's own heat flows.
func TestSolveGivenViewFactors(t *testing.T) {
	dir := t.TempDir()
	inner := mesh.Sphere("inner", geometry.Vec3{}, 0.1, 6, false)
	outer := mesh.Sphere("outer", geometry.Vec3{}, 0.2, 6, true)
	for name, m := range map[string]*mesh.Mesh{"inner.stl": inner, "outer.stl": outer} {
		f, _ := os.Create(filepath.Join(dir, name))
		if err := mesh.WriteSTL(f, m, strings.TrimSuffix(name, ".stl")); err != nil {
			t.Fatal(err)
		}
		f.Close()
	}
	cs := filepath.Join(dir, "c.toml")
	os.WriteFile(cs, []byte("[model]\nfiles = [\"inner.stl\", \"outer.stl\"]\n[rays]\nper_node = 20000\n[surfaces.inner]\nemissivity = 0.3\ntemperature = 700\n[surfaces.outer]\nemissivity = 0.6\ntemperature = 300\n"), 0o644)
	// Areas as hemiray reads them (binary STL rounds to float32).
	in, err := openCase(cs)
	if err != nil {
		t.Fatal(err)
	}
	a1, a2 := in.Mesh.Surfaces[0].Area, in.Mesh.Surfaces[1].Area
	r := strconv.FormatFloat(a1/a2, 'g', -1, 64)
	files := map[string]string{
		"square.csv": "from,inner,outer\ninner,0,1\nouter," + r + "," + strconv.FormatFloat(1-a1/a2, 'g', -1, 64) + "\n",
		"pairs.csv":  "from,to,F\ninner,outer,1\nouter,inner," + r + "\nouter,outer," + strconv.FormatFloat(1-a1/a2, 'g', -1, 64) + "\n",
	}
	want := exchange.Sigma * a1 * (math.Pow(700, 4) - math.Pow(300, 4)) / (1/0.3 + a1/a2*(1/0.6-1))
	for name, text := range files {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(text), 0o644)
		out := filepath.Join(dir, "out-"+name)
		code, _, e := runCLI("solve", cs, "--viewfactors", p, "--no-pictures", "-o", out)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", name, code, e)
		}
		s := readSurfaces(t, filepath.Join(out, "surfaces.csv"))
		if q := val(t, s["inner"]["Q_W"]); math.Abs(q-want) > 1e-9*want || s["inner"]["Q_halfwidth_W"] != "" {
			t.Errorf("%s: Q(inner) = %v ± %q W, closed form %v W", name, q, s["inner"]["Q_halfwidth_W"], want)
		}
	}
	// A traced run, solved again from its own raw matrix.
	run := filepath.Join(dir, "run")
	if code, _, e := runCLI("run", cs, "--quiet", "--no-pictures", "-o", run); code != 0 {
		t.Fatal(e)
	}
	again := filepath.Join(dir, "again")
	if code, _, e := runCLI("solve", cs, "--viewfactors", filepath.Join(run, "viewfactors.csv"), "--no-pictures", "-o", again); code != 0 {
		t.Fatal(e)
	}
	s1, s2 := readSurfaces(t, filepath.Join(run, "surfaces.csv")), readSurfaces(t, filepath.Join(again, "surfaces.csv"))
	for _, n := range []string{"inner", "outer"} {
		if q1, q2 := val(t, s1[n]["Q_W"]), val(t, s2[n]["Q_W"]); math.Abs(q1-q2) > 1e-9*math.Abs(q1) {
			t.Errorf("%s: Q from tallies %v W, from its viewfactors.csv %v W", n, q1, q2)
		}
	}
	// Names the model does not have are refused.
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("from,to,F\ninner,roof,1\n"), 0o644)
	if code, _, e := runCLI("solve", cs, "--viewfactors", bad, "-o", filepath.Join(dir, "x")); code != 1 || !strings.Contains(e, `"roof"`) {
		t.Errorf("unknown node: exit %d, %q", code, e)
	}
}

// render refuses to paint the results of another model.
func TestRenderRefusesOtherResults(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "cabinet")
	if code, _, e := runCLI("trace", "../../testdata/cabinet_multi.stl", "--rays", "2000", "--quiet", "-o", out); code != 0 {
		t.Fatal(e)
	}
	code, _, e := runCLI("render", "../../testdata/duct_bend.obj", "--color", "ambient", "--results", out, "-o", filepath.Join(dir, "x.png"))
	if code != 1 || !strings.Contains(e, "another model") {
		t.Errorf("render with another model's results: exit %d, %q", code, e)
	}
	if code, _, e := runCLI("render", "../../testdata/cabinet_multi.stl", "--color", "ambient", "--results", out, "--size", "200x100", "-o", filepath.Join(dir, "y.png")); code != 0 {
		t.Errorf("render with its own results: exit %d, %q", code, e)
	}
}

// Errors of the smoothing and the solve name the surface, not an internal
// node number, and a node whose rays all met backs gets the diagnosis of
// flipped normals: here a plate inside a box whose normals point out.
func TestRunErrorsNameSurfaces(t *testing.T) {
	dir := t.TempDir()
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m := mesh.Merge("shell", mesh.Box("", geometry.Box{Max: v(1, 1, 1)}, 2, false))
	if err := m.Append(mesh.Rectangle("plate", v(0.25, 0.25, 0.5), v(0.5, 0, 0), v(0, 0.5, 0), 1, 1)); err != nil {
		t.Fatal(err)
	}
	f, _ := os.Create(filepath.Join(dir, "m.obj"))
	mesh.WriteOBJ(f, m)
	f.Close()
	cs := filepath.Join(dir, "c.toml")
	os.WriteFile(cs, []byte("[model]\nfiles = [\"m.obj\"]\n[ambient]\ntemperature = 300\n[defaults]\nemissivity = 0.5\ntemperature = 300\n"), 0o644)
	code, _, e := runCLI("run", cs, "--rays", "2000", "--quiet", "--no-pictures", "-o", filepath.Join(dir, "o"))
	if code != 1 || !strings.Contains(e, "plate: no ray from it reached") || !strings.Contains(e, "flipped") || strings.Contains(e, "node 1") {
		t.Errorf("exit %d, %q", code, e)
	}
}

// A surface split into a grid of nodes shares its heat flow by area, and
// facets.csv maps every facet back to its node.
func TestRunSplitSurface(t *testing.T) {
	dir := t.TempDir()
	mesh, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	cs := filepath.Join(dir, "c.toml")
	os.WriteFile(cs, []byte("[model]\nfiles = [\""+mesh+"\"]\n[ambient]\ntemperature = 290\n[defaults]\nemissivity = 0.8\ntemperature = 300\n[surfaces.floor]\nsplit = \"grid 3x1\"\nheat_flow = 12\n"), 0o644)
	out := filepath.Join(dir, "o")
	if code, _, e := runCLI("run", cs, "--rays", "4000", "--quiet", "--no-pictures", "-o", out); code != 0 {
		t.Fatal(e)
	}
	s := readSurfaces(t, filepath.Join(out, "surfaces.csv"))
	total, area := 0.0, 0.0
	for name, row := range s {
		if strings.HasPrefix(name, "floor[") {
			total += val(t, row["Q_set_W"])
			area += val(t, row["area_m2"])
		}
	}
	for name, row := range s {
		if strings.HasPrefix(name, "floor[") {
			if q, want := val(t, row["Q_set_W"]), 12*val(t, row["area_m2"])/area; math.Abs(q-want) > 1e-9 {
				t.Errorf("%s carries %v W, its share of the area gives %v", name, q, want)
			}
		}
	}
	if math.Abs(total-12) > 1e-9 || len(s) < 3 {
		t.Errorf("floor nodes carry %v W in all (want 12), nodes %v", total, len(s))
	}
	if f := string(mustRead(t, filepath.Join(out, "facets.csv"))); !strings.HasPrefix(f, "facet,surface,node,back_node\n0,") || !strings.Contains(f, "floor[") {
		t.Errorf("facets.csv starts %q", f[:min(len(f), 80)])
	}
}

// --drop-conductors leaves out exactly the conductors below the share of
// both nodes' emission, and nodes.csv gives each node's dropped share:
// compared with a run that keeps them all (the same seed, so the same
// factors).
func TestDropConductors(t *testing.T) {
	dir := t.TempDir()
	cs, err := analysis.WriteDemo(filepath.Join(dir, "demo"))
	if err != nil {
		t.Fatal(err)
	}
	all, some := filepath.Join(dir, "all"), filepath.Join(dir, "some")
	const tau = 0.02
	for _, r := range []struct {
		out  string
		more []string
	}{{all, nil}, {some, []string{"--drop-conductors", fmt.Sprint(tau)}}} {
		args := append([]string{"run", cs, "--rays", "3000", "--quiet", "--no-pictures", "-o", r.out}, r.more...)
		if code, _, e := runCLI(args...); code != 0 {
			t.Fatal(e)
		}
	}
	s := readSurfaces(t, filepath.Join(all, "surfaces.csv"))
	emission := func(n string) float64 { return exchange.Sigma * val(t, s[n]["emissivity"]) * val(t, s[n]["area_m2"]) }
	read := func(p string) [][]string { return readCSV(t, p)[1:] }
	kept := map[[2]string]bool{}
	for _, r := range read(filepath.Join(some, "conductances.csv")) {
		kept[[2]string{r[0], r[1]}] = true
	}
	dropped := map[string]float64{}
	gone := 0
	for _, r := range read(filepath.Join(all, "conductances.csv")) {
		if r[1] == "ambient" {
			if !kept[[2]string{r[0], r[1]}] {
				t.Errorf("%s–ambient dropped: the ambient link is never dropped", r[0])
			}
			continue
		}
		g := val(t, r[3])
		small := g < tau*min(emission(r[0]), emission(r[1]))
		if small == kept[[2]string{r[0], r[1]}] {
			t.Errorf("%s–%s, %v W/K⁴: below the threshold %v, kept %v", r[0], r[1], g, small, !small)
		}
		if small {
			gone++
			dropped[r[0]] += g / emission(r[0])
			dropped[r[1]] += g / emission(r[1])
		}
	}
	if gone == 0 {
		t.Fatalf("nothing dropped at %v: pick a larger threshold", tau)
	}
	for _, r := range read(filepath.Join(some, "nodes.csv")) {
		if r[1] == "ambient" {
			continue
		}
		if got := val(t, r[8]); math.Abs(got-dropped[r[1]]) > 1e-9 {
			t.Errorf("%s: dropped share %v, want %v", r[1], got, dropped[r[1]])
		}
	}
	if code, _, e := runCLI("run", cs, "--drop-conductors", "1", "-o", filepath.Join(dir, "x")); code != 2 || !strings.Contains(e, "--drop-conductors") {
		t.Errorf("--drop-conductors 1: exit %d, %q", code, e)
	}
	none := filepath.Join(dir, "none")
	if code, _, e := runCLI("run", cs, "--rays", "3000", "--quiet", "--no-pictures", "--no-conductances", "-o", none); code != 0 {
		t.Fatal(e)
	}
	for _, f := range []string{"conductances.csv", "conductances.mtx"} {
		if _, err := os.Stat(filepath.Join(none, f)); err == nil {
			t.Errorf("--no-conductances wrote %s", f)
		}
	}
	compact := filepath.Join(dir, "compact")
	if code, _, e := runCLI("run", cs, "--rays", "3000", "--quiet", "--no-pictures", "--csv", "compact", "-o", compact); code != 0 {
		t.Fatal(e)
	}
	for f, want := range map[string]bool{"conductances.csv": false, "conductances.mtx": true} {
		if _, err := os.Stat(filepath.Join(compact, f)); (err == nil) != want {
			t.Errorf("--csv compact: %s written %v, want %v", f, err == nil, want)
		}
	}
}

// A case with mirror surfaces from the command line: two plates across a
// box whose side walls are near-perfect mirrors exchange as infinite
// parallel plates, Q = σA(T₁⁴ − T₂⁴)/(1/ε₁ + 1/ε₂ − 1) (Siegel & Howell,
// Thermal Radiation Heat Transfer, the chapter on specular surfaces; from
// memory). The run writes absorption factors, not view factors; a changed
// emissivity now changes the tallies, so solve refuses to reuse them.
func TestRunMirrorWalls(t *testing.T) {
	dir := t.TempDir()
	f, _ := os.Create(filepath.Join(dir, "box.obj"))
	if err := mesh.WriteOBJ(f, mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 0.5}}, 2, true)); err != nil {
		t.Fatal(err)
	}
	f.Close()
	caseText := `[model]
files = ["box.obj"]
[rays]
per_node = 40000
[defaults]
emissivity = 1e-9
specular = 1
adiabatic = true
[surfaces.zmin]
emissivity = 0.5
specular = 0
temperature = 600
[surfaces.zmax]
emissivity = 0.3
temperature = 300
`
	path := filepath.Join(dir, "mirrors.toml")
	os.WriteFile(path, []byte(caseText), 0o644)
	out := filepath.Join(dir, "out")
	if code, so, se := runCLI("run", path, "--quiet", "-o", out); code != 0 {
		t.Fatalf("run: exit %d\n%s\n%s", code, so, se)
	}
	s := readSurfaces(t, filepath.Join(out, "surfaces.csv"))
	want := exchange.Sigma * (math.Pow(600, 4) - math.Pow(300, 4)) / (1/0.5 + 1/0.3 - 1)
	q, hw := val(t, s["zmin"]["Q_W"]), val(t, s["zmin"]["Q_halfwidth_W"])
	if math.Abs(q-want) > 2*hw || hw > 0.01*want {
		t.Errorf("Q(zmin) = %.5g ± %.3g W, closed form %.5g W", q, hw, want)
	}
	if j := s["zmin"]["J_W_per_m2"]; j != "" {
		t.Errorf("a radiosity %q is written for absorption factors", j)
	}
	for _, name := range []string{"absorption.csv", "absorption_pairs.csv", "absorption_smoothed.csv", "absorption_smoothed.mtx", "conductances.csv"} {
		if _, err := os.Stat(filepath.Join(out, name)); err != nil {
			t.Errorf("missing %s", name)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "viewfactors.csv")); err == nil {
		t.Error("viewfactors.csv written for absorption factors")
	}
	if b := mustRead(t, filepath.Join(out, "summary.json")); !bytes.Contains(b, []byte(`"factors": "absorption"`)) {
		t.Error(`summary.json does not say "factors": "absorption"`)
	}
	os.WriteFile(path, []byte(strings.Replace(caseText, "emissivity = 0.3", "emissivity = 0.4", 1)), 0o644)
	if code, _, se := runCLI("solve", path, "-o", out); code != 1 || !strings.Contains(se, "optics of zmax changed from emissivity 0.3") {
		t.Errorf("solve after an emissivity change: exit %d, %s", code, se)
	}
	if code, _, se := runCLI("solve", path, "-o", out, "--viewfactors", filepath.Join(out, "absorption.csv")); code != 1 || !strings.Contains(se, "view factors cannot describe") {
		t.Errorf("solve with given view factors: exit %d, %s", code, se)
	}
}

// A bad [[sun]] table is named by its own line, the second one too.
func TestSunErrorLine(t *testing.T) {
	dir := t.TempDir()
	mesh, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	text := "[model]\nfiles = [\"" + mesh + "\"]\n[defaults]\nemissivity = 0.5\nsolar_absorptance = 0.5\ntemperature = 300\n" +
		"[[sun]]\nname = \"a\"\ntoward = [0, 0, 1]\nirradiance = 1000\n" +
		"[[sun]]\nname = \"b\"\nazimuth = 10\nirradiance = 1000\n"
	p := filepath.Join(dir, "c.toml")
	os.WriteFile(p, []byte(text), 0o644)
	if _, err := openCase(p); err == nil || !strings.Contains(err.Error(), "c.toml:11:") || !strings.Contains(err.Error(), "sun b") {
		t.Errorf("bad second sun: %v", err)
	}
}
