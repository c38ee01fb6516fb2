package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// A failed write leaves neither the target nor a temporary file, and a
// written file honours the umask (common practice for Unix tools).
func TestWrite(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "sub", "a.csv")
	if err := Write(p, func(w io.Writer) error { _, err := io.WriteString(w, "x\n"); return err }); err != nil {
		t.Fatal(err)
	}
	old := syscall.Umask(0o022)
	defer syscall.Umask(old)
	if err := Write(p, func(w io.Writer) error { _, err := io.WriteString(w, "y\n"); return err }); err != nil {
		t.Fatal(err)
	}
	st, err := os.Stat(p)
	if err != nil || st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, %v; want 0644 under umask 022", st.Mode().Perm(), err)
	}
	boom := errors.New("boom")
	if err := Write(filepath.Join(dir, "b.csv"), func(w io.Writer) error { return boom }); !errors.Is(err, boom) {
		t.Errorf("error %v", err)
	}
	left, _ := os.ReadDir(dir)
	if len(left) != 1 {
		t.Errorf("left behind: %v", left)
	}
	if b, _ := os.ReadFile(p); string(b) != "y\n" {
		t.Errorf("content %q", b)
	}
}

// A second lock on a held folder fails at once and names the holder; a
// leftover temporary file is cleaned up; the lock can be taken again after
// it is released.
func TestLock(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	unlock, err := Lock(dir)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, ".surfaces.csv.0badf00d.tmp"), []byte("half"), 0o644)
	if _, err := Lock(dir); !errors.Is(err, ErrLocked) || !strings.Contains(err.Error(), "hemiray pid") {
		t.Errorf("second lock: %v", err)
	}
	unlock()
	unlock2, err := Lock(dir)
	if err != nil {
		t.Fatalf("lock after unlock: %v", err)
	}
	defer unlock2()
	if left, _ := filepath.Glob(filepath.Join(dir, ".*.tmp")); len(left) != 0 {
		t.Errorf("stale temporary files left: %v", left)
	}
	ro := filepath.Join(t.TempDir(), "ro")
	os.Mkdir(ro, 0o555)
	if os.Getuid() != 0 { // root writes anywhere
		if _, err := Lock(ro); err == nil {
			t.Error("an unwritable folder was locked")
		}
	}
}
