package fgb

import (
	"encoding/binary"
	"math"
)

// builder assembles one FlatBuffers buffer back to front, as the format's
// reference builders do: children are written before their parents, so
// every offset from a table field or a vector element points forward to a
// higher address (uoffset_t is unsigned). Positions are counted from the
// end of the buffer (off = bytes written so far); an object written at off
// o lies at address len − o of the finished buffer, and a reference stored
// at off f to an object at off o is the uoffset f − o.
//
// Alignment: every scalar is aligned to its size from the start of the
// finished buffer, which Finish pads to a multiple of 8.
//
// Reference: FlatBuffers, "Internals" (flatbuffers.dev/internals): tables
// start with an soffset_t to their vtable (vtable = table − soffset), a
// vtable holds its size, the table's inline size and one uint16 offset per
// field (0 = absent, the default); vectors are a uint32 length and the
// elements; strings are vectors of bytes with a NUL after them.
type builder struct {
	b      []byte // b[head:] is the buffer written so far
	head   int
	fields []fieldOff // of the table being built
	tstart int        // off where the table's fields began
}

type fieldOff struct{ id, off int }

func newBuilder(size int) *builder {
	b := make([]byte, max(size, 64))
	return &builder{b: b, head: len(b)}
}

func (b *builder) off() int { return len(b.b) - b.head }

// grow makes room for n more bytes at the front.
func (b *builder) grow(n int) {
	if b.head >= n {
		return
	}
	used := b.off()
	size := max(2*len(b.b), used+n+64)
	nb := make([]byte, size)
	copy(nb[size-used:], b.b[b.head:])
	b.b, b.head = nb, size-used
}

// pad writes n zero bytes.
func (b *builder) pad(n int) {
	b.grow(n)
	for range n {
		b.head--
		b.b[b.head] = 0
	}
}

// prep pads so that after writing extra more bytes the position is a
// multiple of align.
func (b *builder) prep(align, extra int) {
	if p := (b.off() + extra) % align; p != 0 {
		b.pad(align - p)
	}
}

func (b *builder) put(v []byte) {
	b.grow(len(v))
	b.head -= len(v)
	copy(b.b[b.head:], v)
}

func (b *builder) u8(v uint8) { b.put([]byte{v}) }
func (b *builder) u16(v uint16) {
	b.prep(2, 0)
	var t [2]byte
	binary.LittleEndian.PutUint16(t[:], v)
	b.put(t[:])
}
func (b *builder) u32(v uint32) {
	b.prep(4, 0)
	var t [4]byte
	binary.LittleEndian.PutUint32(t[:], v)
	b.put(t[:])
}
func (b *builder) u64(v uint64) {
	b.prep(8, 0)
	var t [8]byte
	binary.LittleEndian.PutUint64(t[:], v)
	b.put(t[:])
}

// ref writes a uoffset to the object at off o.
func (b *builder) ref(o int) {
	b.prep(4, 0)
	b.u32(uint32(b.off() + 4 - o))
}

// str writes a string and returns its off.
func (b *builder) str(s string) int {
	b.prep(4, len(s)+1)
	b.u8(0)
	b.put([]byte(s))
	b.u32(uint32(len(s)))
	return b.off()
}

// bytesVec writes a vector of bytes and returns its off.
func (b *builder) bytesVec(v []byte) int {
	b.prep(4, len(v))
	b.put(v)
	b.u32(uint32(len(v)))
	return b.off()
}

// u32Vec writes a vector of uint32 and returns its off.
func (b *builder) u32Vec(v []uint32) int {
	b.prep(4, 4*len(v))
	for i := len(v) - 1; i >= 0; i-- {
		b.u32(v[i])
	}
	b.u32(uint32(len(v)))
	return b.off()
}

// f64Vec writes a vector of float64 and returns its off.
func (b *builder) f64Vec(v []float64) int {
	b.prep(4, 8*len(v))
	b.prep(8, 8*len(v))
	for i := len(v) - 1; i >= 0; i-- {
		b.u64(math.Float64bits(v[i]))
	}
	b.u32(uint32(len(v)))
	return b.off()
}

// refVec writes a vector of references to the objects at offs.
func (b *builder) refVec(offs []int) int {
	b.prep(4, 4*len(offs))
	for i := len(offs) - 1; i >= 0; i-- {
		b.ref(offs[i])
	}
	b.u32(uint32(len(offs)))
	return b.off()
}

// Tables: start, add fields (larger scalars first keeps padding small),
// end.
func (b *builder) start() { b.fields = b.fields[:0]; b.tstart = b.off() }

func (b *builder) fieldU8(id int, v uint8) {
	b.u8(v)
	b.fields = append(b.fields, fieldOff{id, b.off()})
}
func (b *builder) fieldU16(id int, v uint16) {
	b.u16(v)
	b.fields = append(b.fields, fieldOff{id, b.off()})
}
func (b *builder) fieldI32(id int, v int32) {
	b.u32(uint32(v))
	b.fields = append(b.fields, fieldOff{id, b.off()})
}
func (b *builder) fieldU64(id int, v uint64) {
	b.u64(v)
	b.fields = append(b.fields, fieldOff{id, b.off()})
}
func (b *builder) fieldRef(id, o int) { b.ref(o); b.fields = append(b.fields, fieldOff{id, b.off()}) }

// end writes the table's soffset and its vtable, and returns the table's off.
func (b *builder) end() int {
	b.prep(4, 0)
	b.u32(0) // soffset, patched below
	t := b.off()
	n := 0
	for _, f := range b.fields {
		n = max(n, f.id+1)
	}
	vt := make([]uint16, 2+n)
	vt[0] = uint16(2 * (2 + n))
	vt[1] = uint16(t - b.tstart)
	for _, f := range b.fields {
		vt[2+f.id] = uint16(t - f.off)
	}
	for i := len(vt) - 1; i >= 0; i-- {
		b.u16(vt[i])
	}
	v := b.off()
	// vtable = table − soffset: soffset = table address − vtable address.
	binary.LittleEndian.PutUint32(b.b[len(b.b)-t:], uint32(int32(v-t)))
	return t
}

// finish writes the root reference to the table at off root, padded so
// the buffer's length is a multiple of 8, and returns the buffer.
func (b *builder) finish(root int) []byte {
	b.prep(8, 4)
	b.ref(root)
	return b.b[b.head:]
}
