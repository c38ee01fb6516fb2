package raytrace

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
)

// The tally file stores a Checkpoint with a caller's metadata block, for
// checkpoints, resumes and shards. Layout, little-endian:
//
//	magic     8 bytes "HEMIRAYT"
//	version   uint32 (1)
//	meta      uint32 length, then that many bytes (the caller's, e.g. JSON)
//	nodes     uint32 N, replicas uint32 R
//	targets   N × int64
//	done      uint64 count, then (node uint32, lo int64, hi int64) each
//	tallies   1 + R times (pooled first), per node: rays int64, escaped int64,
//	          hits row, back row; a row is uint32 length, then (col uint32, count int64)
//	checksum  SHA-256 of everything before it
//
// A truncated, corrupted or foreign file fails with a clear error.
const (
	tallyMagic   = "HEMIRAYT"
	tallyVersion = 1
)

// ErrTallyFile marks a file that is not a readable tally file.
var ErrTallyFile = errors.New("not a valid hemiray tally file")

// WriteTallyFile writes ck and meta to w. It streams: memory stays a few
// megabytes however large the tallies (gigabytes at 10⁴ nodes and 10⁴ rays
// per node), and the SHA-256 of everything before it closes the file.
func WriteTallyFile(w io.Writer, ck *Checkpoint, meta []byte) error {
	h := sha256.New()
	bw := bufio.NewWriterSize(io.MultiWriter(w, h), 1<<20)
	le := binary.LittleEndian
	var buf []byte
	spill := func() {
		if len(buf) >= 1<<16 {
			bw.Write(buf) // an error sticks in bw and comes back from Flush
			buf = buf[:0]
		}
	}
	u32 := func(v uint32) { buf = le.AppendUint32(buf, v); spill() }
	i64 := func(v int64) { buf = le.AppendUint64(buf, uint64(v)); spill() }
	buf = append(buf, tallyMagic...)
	u32(tallyVersion)
	u32(uint32(len(meta)))
	buf = append(buf, meta...)
	n := len(ck.Targets)
	u32(uint32(n))
	u32(uint32(len(ck.Replicas)))
	for _, t := range ck.Targets {
		i64(t)
	}
	i64(int64(len(ck.Done)))
	for _, u := range ck.Done {
		u32(uint32(u.Node))
		i64(u.Lo)
		i64(u.Hi)
	}
	row := func(r *Row) {
		u32(uint32(len(r.Col)))
		for k := range r.Col {
			u32(uint32(r.Col[k]))
			i64(r.Val[k])
		}
	}
	for _, t := range append([]Tally{ck.Tally}, ck.Replicas...) {
		for i := range n {
			i64(t.Rays[i])
			i64(t.Escaped[i])
			row(&t.Hits[i])
			row(&t.Back[i])
		}
	}
	bw.Write(buf)
	if err := bw.Flush(); err != nil {
		return err
	}
	_, err := w.Write(h.Sum(nil))
	return err
}

// tallyReader reads little-endian values from a byte slice, failing (once)
// when it runs out.
type tallyReader struct {
	b   []byte
	err error
}

func (r *tallyReader) take(n int) []byte {
	if r.err != nil || n < 0 || n > len(r.b) {
		if r.err == nil {
			r.err = fmt.Errorf("%w: it ends early", ErrTallyFile)
		}
		return nil
	}
	out := r.b[:n]
	r.b = r.b[n:]
	return out
}

func (r *tallyReader) u32() uint32 {
	if b := r.take(4); b != nil {
		return binary.LittleEndian.Uint32(b)
	}
	return 0
}

func (r *tallyReader) u64() uint64 {
	if b := r.take(8); b != nil {
		return binary.LittleEndian.Uint64(b)
	}
	return 0
}

func (r *tallyReader) i64() int64 { return int64(r.u64()) }

// count reads a length and checks that that many items of the given size
// can still be in the file, so a corrupt count never allocates.
func (r *tallyReader) count(v uint64, size int) int {
	size = max(size, 1) // a count of empty items is still bounded by the file
	if r.err == nil && (v > math.MaxInt32 || v*uint64(size) > uint64(len(r.b))) {
		r.err = fmt.Errorf("%w: a length (%d) exceeds the file", ErrTallyFile, v)
	}
	if r.err != nil {
		return 0
	}
	return int(v)
}

// ReadTallyFile reads a tally file written by WriteTallyFile.
func ReadTallyFile(data []byte) (ck *Checkpoint, meta []byte, err error) {
	if len(data) < len(tallyMagic)+4+32 || string(data[:len(tallyMagic)]) != tallyMagic {
		return nil, nil, fmt.Errorf("%w: no hemiray header", ErrTallyFile)
	}
	body, sum := data[:len(data)-32], data[len(data)-32:]
	if got := sha256.Sum256(body); !bytes.Equal(got[:], sum) {
		return nil, nil, fmt.Errorf("%w: the checksum does not match (truncated or corrupted)", ErrTallyFile)
	}
	r := &tallyReader{b: body[len(tallyMagic):]}
	if v := r.u32(); v != tallyVersion {
		return nil, nil, fmt.Errorf("%w: version %d, this hemiray reads version %d", ErrTallyFile, v, tallyVersion)
	}
	meta = r.take(r.count(uint64(r.u32()), 1))
	n := r.count(uint64(r.u32()), 8)
	reps := r.count(uint64(r.u32()), 16*n)
	ck = &Checkpoint{Targets: make([]int64, n)}
	for i := range ck.Targets {
		ck.Targets[i] = r.i64()
	}
	nd := r.count(r.u64(), 20)
	ck.Done = make([]UnitID, nd)
	for k := range ck.Done {
		ck.Done[k] = UnitID{Node: NodeID(r.u32()), Lo: r.i64(), Hi: r.i64()}
		if u := ck.Done[k]; r.err == nil && (int(u.Node) >= n || u.Node < 0 || u.Lo < 0 || u.Hi <= u.Lo) {
			r.err = fmt.Errorf("%w: work unit %+v is out of range", ErrTallyFile, u)
		}
	}
	row := func() Row {
		m := r.count(uint64(r.u32()), 12)
		if m == 0 {
			return Row{}
		}
		out := Row{Col: make([]int32, m), Val: make([]int64, m)}
		for k := range m {
			out.Col[k], out.Val[k] = int32(r.u32()), r.i64()
		}
		return out
	}
	readTally := func() Tally {
		t := *newTally(n)
		for i := range n {
			t.Rays[i], t.Escaped[i] = r.i64(), r.i64()
			t.Hits[i], t.Back[i] = row(), row()
		}
		return t
	}
	ck.Tally = readTally()
	for range reps {
		ck.Replicas = append(ck.Replicas, readTally())
	}
	if r.err == nil && len(r.b) != 0 {
		r.err = fmt.Errorf("%w: %d bytes left over", ErrTallyFile, len(r.b))
	}
	if r.err != nil {
		return nil, nil, r.err
	}
	return ck, meta, nil
}
