package atomicfile

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"unsafe"
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

// WriteLarge gives the same bytes as Write at every size around its block
// and buffer boundaries, and so does a direct writer whose buffer is not
// aligned, which the kernel refuses (EINVAL) and the writer then falls
// back from.
func TestWriteLarge(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []int{0, 1, 4095, 4096, 4097, 4<<20 - 1, 4 << 20, 4<<20 + 1, 9<<20 + 123} {
		want := make([]byte, n)
		for i := range want {
			want[i] = byte(i*7 + i>>12)
		}
		p := filepath.Join(dir, fmt.Sprintf("f%d", n))
		// Pieces of odd sizes, as formatted text comes.
		err := WriteLarge(p, func(w io.Writer) error {
			for at := 0; at < n; {
				k := min(n-at, 1+(at*31)%100003)
				if _, err := w.Write(want[at : at+k]); err != nil {
					return err
				}
				at += k
			}
			return nil
		})
		if err != nil {
			t.Fatalf("%d bytes: %v", n, err)
		}
		if got, _ := os.ReadFile(p); !bytes.Equal(got, want) {
			t.Fatalf("%d bytes: read back %d bytes, different", n, len(got))
		}
	}
	if directFlag == 0 {
		return
	}
	p := filepath.Join(dir, "misaligned")
	f, err := os.OpenFile(p, os.O_RDWR|os.O_CREATE|directFlag, 0o666)
	if err != nil {
		t.Skipf("no direct writes here: %v", err)
	}
	defer f.Close()
	d := newDirectWriter(f)
	raw := make([]byte, cap(d.buf)+directBlock+1)
	off := int((directBlock-uintptr(unsafe.Pointer(&raw[0]))%directBlock)%directBlock) + 1
	d.buf = raw[off : off : off+cap(d.buf)]
	want := bytes.Repeat([]byte("0123456789abcdef"), 600000) // 9.6 MB
	if _, err := d.Write(want); err != nil {
		t.Fatal(err)
	}
	if err := d.finish(); err != nil {
		t.Fatal(err)
	}
	if d.direct {
		t.Log("an unaligned direct write was accepted here")
	}
	if got, _ := os.ReadFile(p); !bytes.Equal(got, want) {
		t.Fatalf("misaligned: read back %d bytes, different", len(got))
	}
}
