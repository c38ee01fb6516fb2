package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

// readmeScript returns the fenced bash block after the line naming file in
// README.md, so that the test runs the recipe exactly as users read it.
func readmeScript(t *testing.T, file string) string {
	t.Helper()
	b := mustRead(t, filepath.Join("..", "..", "README.md"))
	re := regexp.MustCompile("(?s)`" + regexp.QuoteMeta(file) + "`:\\s*```bash\n(.*?)```")
	m := re.FindSubmatch(b)
	if m == nil {
		t.Fatalf("README.md has no bash block for %s", file)
	}
	return string(m[1])
}

// TestSlurmArray runs the README's job-array recipe on a real single-node
// Slurm cluster (../shared/slurm/local-cluster.sh) and compares the merged
// results with a single-process run byte for byte. Without Slurm it skips,
// unless HEMIRAY_SLURM_REQUIRED=1 (as in CI) makes that a failure.
func TestSlurmArray(t *testing.T) {
	required := os.Getenv("HEMIRAY_SLURM_REQUIRED") == "1"
	unavailable := func(why string) {
		if required {
			t.Fatalf("Slurm cluster required but unavailable: %s", why)
		}
		t.Skip("no Slurm cluster: " + why + " (set HEMIRAY_SLURM_REQUIRED=1 to make this a failure)")
	}
	script, _ := filepath.Abs(filepath.Join("..", "..", "..", "shared", "slurm", "local-cluster.sh"))
	if _, err := os.Stat(script); err != nil {
		unavailable("no " + script)
	}
	if _, err := exec.LookPath("sbatch"); err != nil {
		unavailable("sbatch is not installed")
	}
	if out, err := exec.Command("bash", script, "start").CombinedOutput(); err != nil {
		unavailable(fmt.Sprintf("local-cluster.sh start: %v\n%s", err, out))
	}
	envOut, err := exec.Command("bash", script, "env").Output()
	if err != nil {
		t.Fatal(err)
	}
	work := t.TempDir()
	bin := filepath.Join(work, "bin")
	if out, err := exec.Command("go", "build", "-o", filepath.Join(bin, "hemiray"), ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	env := append(os.Environ(), "PATH="+bin+":"+os.Getenv("PATH"))
	for _, m := range regexp.MustCompile(`export (\w+)=("?)([^"\n]*)"?`).FindAllStringSubmatch(string(envOut), -1) {
		env = append(env, m[1]+"="+m[3])
	}
	// A case with conditions, so merge smooths and solves too.
	writeBox(t, work)
	os.WriteFile(filepath.Join(work, "case.toml"), []byte(`[model]
files = ["box.obj"]
[rays]
per_node = 150000
seed = 77
replicates = 4
[defaults]
emissivity = 0.7
adiabatic = true
[surfaces.zmin]
temperature = 500
[surfaces.zmax]
temperature = 300
`), 0o644)
	os.WriteFile(filepath.Join(work, "shards.sbatch"), []byte(readmeScript(t, "shards.sbatch")), 0o755)
	os.WriteFile(filepath.Join(work, "merge.sbatch"), []byte(readmeScript(t, "merge.sbatch")), 0o755)
	sbatch := func(args ...string) string {
		cmd := exec.Command("sbatch", append([]string{"--parsable"}, args...)...)
		cmd.Dir, cmd.Env = work, env
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("sbatch %v: %v\n%s", args, err, out)
		}
		id, _, _ := strings.Cut(strings.TrimSpace(string(out)), ";")
		return id
	}
	arr := sbatch("shards.sbatch")
	mrg := sbatch("--dependency=afterok:"+arr, "merge.sbatch")
	// Poll with our own limit (sbatch --wait is not trusted: see shared/slurm/README.md).
	deadline := time.Now().Add(4 * time.Minute)
	for {
		q := exec.Command("squeue", "-h", "-t", "all", "-j", arr+","+mrg, "-o", "%i %T %r")
		q.Env = env
		st, _ := q.Output()
		s := string(st)
		if strings.Contains(s, "DependencyNeverSatisfied") {
			logs, _ := filepath.Glob(filepath.Join(work, "*.log"))
			var b bytes.Buffer
			for _, l := range logs {
				fmt.Fprintf(&b, "== %s\n%s\n", l, mustRead(t, l))
			}
			t.Fatalf("an array task failed:\n%s\n%s", s, b.String())
		}
		if !regexp.MustCompile(`PENDING|CONFIGURING|RUNNING|COMPLETING|REQUEUED`).MatchString(s) && strings.Contains(s, mrg) {
			if strings.Count(s, "COMPLETED") != 5 {
				t.Fatalf("job states:\n%s", s)
			}
			break
		}
		if time.Now().After(deadline) {
			exec.Command("scancel", arr, mrg).Run()
			t.Fatalf("jobs not finished after 4 minutes:\n%s", s)
		}
		time.Sleep(time.Second)
	}
	single := exec.Command(filepath.Join(bin, "hemiray"), "run", "case.toml", "--quiet", "-o", "single")
	single.Dir, single.Env = work, env
	if out, err := single.CombinedOutput(); err != nil {
		t.Fatalf("single run: %v\n%s", err, out)
	}
	for _, f := range append(compared, "surfaces.csv", "conductances.csv", "viewfactors_smoothed.csv") {
		if !sameFile(filepath.Join(work, "results", f), filepath.Join(work, "single", f)) {
			t.Errorf("%s: Slurm array result differs from the single run", f)
		}
	}
}
