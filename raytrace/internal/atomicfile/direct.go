package atomicfile

import (
	"errors"
	"os"
	"syscall"
	"unsafe"
)

// directBlock is the alignment direct writes need, of the buffer's address,
// the file offset and the length: 4 KiB covers the logical block size of
// common disks (512 bytes or 4 KiB).
const directBlock = 4096

// directWriter gathers bytes into an aligned buffer and writes it whole
// with the file opened for direct writes. The tail that does not fill a
// block is written after direct writes are turned off, and a file system
// that refuses a direct write (EINVAL) gets the rest through the page
// cache.
type directWriter struct {
	f      *os.File
	buf    []byte // aligned to directBlock; len is what is gathered
	direct bool
}

func newDirectWriter(f *os.File) *directWriter {
	const size = 4 << 20
	raw := make([]byte, size+directBlock)
	off := int((directBlock - uintptr(unsafe.Pointer(&raw[0]))%directBlock) % directBlock)
	return &directWriter{f: f, buf: raw[off : off : off+size], direct: true}
}

func (d *directWriter) Write(p []byte) (int, error) {
	n := len(p)
	for len(p) > 0 {
		k := copy(d.buf[len(d.buf):cap(d.buf)], p)
		d.buf, p = d.buf[:len(d.buf)+k], p[k:]
		if len(d.buf) == cap(d.buf) {
			if err := d.flush(len(d.buf)); err != nil {
				return n - len(p), err
			}
		}
	}
	return n, nil
}

// flush writes the first k bytes of the buffer (whole blocks while direct)
// and keeps the rest at its start.
func (d *directWriter) flush(k int) error {
	if k == 0 {
		return nil
	}
	_, err := d.f.Write(d.buf[:k])
	if d.direct && errors.Is(err, syscall.EINVAL) {
		// Refused: the file system's alignment differs or it takes no
		// direct writes. Nothing was written; go on through the cache.
		if err = d.stopDirect(); err == nil {
			_, err = d.f.Write(d.buf[:k])
		}
	}
	if err != nil {
		return err
	}
	d.buf = d.buf[:copy(d.buf, d.buf[k:])]
	return nil
}

func (d *directWriter) stopDirect() error {
	d.direct = false
	return clearDirect(d.f)
}

// finish writes what is gathered: the whole blocks directly, the tail
// through the cache.
func (d *directWriter) finish() error {
	if err := d.flush(len(d.buf) / directBlock * directBlock); err != nil {
		return err
	}
	if d.direct && len(d.buf) > 0 {
		if err := d.stopDirect(); err != nil {
			return err
		}
	}
	return d.flush(len(d.buf))
}
