package tiling

import (
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"math"

	"glidereach/reach"
)

// The work-file encoding (plan.gob, tiles/*.gob — the names are kept from
// an earlier gob encoding; the content is this format) and the encoding of
// the values on the job graph's edges (TilePart). It is explicit, so the
// same value gives the same bytes in every process, on every machine and
// with every Go version (encoding/gob numbers types per process, which made
// the bytes depend on what else the process had encoded):
//
//	offset 0   magic "GRWF" (4 bytes)
//	offset 4   kind: 'P' plan, 'T' tile result, 'p' tile part (1 byte)
//	offset 5   version, uint16 little-endian (codecVersion)
//	offset 7   the value's fields in declaration order (below)
//	end − 4    CRC-32 (IEEE) of every byte before it, uint32 little-endian
//
// Fields: integers as int64 and floats as their IEEE 754 bits (float64 or
// float32 as declared; NaN payloads and −0 kept), little-endian; bool as one
// byte 0/1; a string as a uint32 byte count and the bytes; a slice as a
// uint64 element count and the elements (a count of 0 decodes to nil). A
// decoder checks the magic, kind, version and checksum, that every count
// fits in the bytes left before allocating, and that nothing follows the
// last field; the shape checks of DecodePlan, DecodeTileResult and
// DecodeTilePart then run as before. A change of any encoded type bumps
// codecVersion (a work directory of another version is refused as another
// plan).
const (
	codecMagic   = "GRWF"
	codecVersion = 1
	codecHeader  = 7
	codecTrailer = 4

	kindPlan       = 'P'
	kindTileResult = 'T'
	kindTilePart   = 'p'
)

// CorruptMarker is ErrCorrupt's text, so it is in the text of every error
// wrapping ErrCorrupt (%w keeps the wrapped error's text; the tests check
// every such error of this package). A process that receives errors only
// as text (a Beam worker's error reaches glidereach-pipeline's launcher as
// a string) recognises a damaged work file by it; rewording ErrCorrupt
// changes this constant, not the matchers.
const CorruptMarker = "tiling: not a valid work file"

// ErrCorrupt is wrapped by every decoding error of a work file or edge
// value that is truncated, damaged or of another kind or version; its text
// is CorruptMarker.
var ErrCorrupt = errors.New(CorruptMarker)

type encoder struct{ b []byte }

func newEncoder(kind byte, sizeHint int) *encoder {
	e := &encoder{b: make([]byte, 0, codecHeader+codecTrailer+sizeHint)}
	e.b = append(e.b, codecMagic...)
	e.b = append(e.b, kind)
	e.b = binary.LittleEndian.AppendUint16(e.b, codecVersion)
	return e
}

func (e *encoder) int(v int)      { e.b = binary.LittleEndian.AppendUint64(e.b, uint64(int64(v))) }
func (e *encoder) f64(v float64)  { e.b = binary.LittleEndian.AppendUint64(e.b, math.Float64bits(v)) }
func (e *encoder) f32(v float32)  { e.b = binary.LittleEndian.AppendUint32(e.b, math.Float32bits(v)) }
func (e *encoder) i32(v int32)    { e.b = binary.LittleEndian.AppendUint32(e.b, uint32(v)) }
func (e *encoder) count(n int)    { e.b = binary.LittleEndian.AppendUint64(e.b, uint64(n)) }
func (e *encoder) bytes(v []byte) { e.count(len(v)); e.b = append(e.b, v...) }
func (e *encoder) u8s(v []uint8)  { e.bytes(v) }
func (e *encoder) bool(v bool) {
	var b byte
	if v {
		b = 1
	}
	e.b = append(e.b, b)
}
func (e *encoder) str(s string) {
	e.b = binary.LittleEndian.AppendUint32(e.b, uint32(len(s)))
	e.b = append(e.b, s...)
}
func (e *encoder) f64s(v []float64) {
	e.count(len(v))
	for _, x := range v {
		e.f64(x)
	}
}
func (e *encoder) f32s(v []float32) {
	e.count(len(v))
	for _, x := range v {
		e.f32(x)
	}
}
func (e *encoder) i32s(v []int32) {
	e.count(len(v))
	for _, x := range v {
		e.i32(x)
	}
}
func (e *encoder) tile(t TileID) { e.int(t.Col); e.int(t.Row) }
func (e *encoder) strs(v []string) {
	e.count(len(v))
	for _, s := range v {
		e.str(s)
	}
}
func (e *encoder) done() []byte {
	return binary.LittleEndian.AppendUint32(e.b, crc32.ChecksumIEEE(e.b))
}
func (e *encoder) target(t reach.Target) {
	e.str(t.Name)
	e.f64(t.Lat)
	e.f64(t.Lon)
	e.f64(t.Elev)
	e.f64(t.Reserve)
}

// decoder reads what encoder wrote; the first error sticks and every later
// read returns zero values.
type decoder struct {
	b    []byte // the fields not yet read
	what string // "plan", "tile result", "tile part"
	err  error
}

func newDecoder(data []byte, kind byte, what string) *decoder {
	d := &decoder{what: what}
	if len(data) < codecHeader+codecTrailer {
		d.fail("%d bytes is shorter than the %d-byte header and checksum", len(data), codecHeader+codecTrailer)
		return d
	}
	if string(data[:4]) != codecMagic {
		d.fail("no %q magic at the start", codecMagic)
		return d
	}
	if data[4] != kind {
		d.fail("kind %q, want %q", data[4], kind)
		return d
	}
	if v := binary.LittleEndian.Uint16(data[5:7]); v != codecVersion {
		d.fail("format version %d, this program reads version %d", v, codecVersion)
		return d
	}
	body, sum := data[:len(data)-codecTrailer], binary.LittleEndian.Uint32(data[len(data)-codecTrailer:])
	if crc32.ChecksumIEEE(body) != sum {
		d.fail("checksum mismatch (truncated or damaged)")
		return d
	}
	d.b = body[codecHeader:]
	return d
}

func (d *decoder) fail(format string, args ...any) {
	if d.err == nil {
		d.err = fmt.Errorf("%w: %s: %s", ErrCorrupt, d.what, fmt.Sprintf(format, args...))
	}
}

func (d *decoder) take(n int) []byte {
	if d.err != nil {
		return nil
	}
	if n < 0 || n > len(d.b) {
		d.fail("truncated: %d bytes needed, %d left", n, len(d.b))
		return nil
	}
	v := d.b[:n]
	d.b = d.b[n:]
	return v
}

func (d *decoder) u64() uint64 {
	if b := d.take(8); b != nil {
		return binary.LittleEndian.Uint64(b)
	}
	return 0
}

func (d *decoder) u32() uint32 {
	if b := d.take(4); b != nil {
		return binary.LittleEndian.Uint32(b)
	}
	return 0
}

func (d *decoder) int() int {
	v := int64(d.u64())
	if int64(int(v)) != v {
		d.fail("integer %d out of range", v)
		return 0
	}
	return int(v)
}

func (d *decoder) f64() float64 { return math.Float64frombits(d.u64()) }
func (d *decoder) f32() float32 { return math.Float32frombits(d.u32()) }
func (d *decoder) i32() int32   { return int32(d.u32()) }

func (d *decoder) bool() bool {
	b := d.take(1)
	if b == nil {
		return false
	}
	if b[0] > 1 {
		d.fail("boolean byte %d", b[0])
	}
	return b[0] == 1
}

// count reads a slice length whose elements take size bytes each, and
// checks they fit in what is left.
func (d *decoder) count(size int) int {
	n := d.u64()
	if d.err != nil {
		return 0
	}
	if n > uint64(len(d.b)/size) {
		d.fail("truncated: %d elements of %d bytes, %d bytes left", n, size, len(d.b))
		return 0
	}
	return int(n)
}

func (d *decoder) str() string {
	n := d.u32()
	return string(d.take(int(n)))
}

func (d *decoder) u8s() []uint8 {
	n := d.count(1)
	if n == 0 {
		return nil
	}
	return append([]uint8(nil), d.take(n)...)
}

func (d *decoder) f64s() []float64 {
	n := d.count(8)
	if n == 0 {
		return nil
	}
	v := make([]float64, n)
	for i := range v {
		v[i] = d.f64()
	}
	return v
}

func (d *decoder) f32s() []float32 {
	n := d.count(4)
	if n == 0 {
		return nil
	}
	v := make([]float32, n)
	for i := range v {
		v[i] = d.f32()
	}
	return v
}

func (d *decoder) i32s() []int32 {
	n := d.count(4)
	if n == 0 {
		return nil
	}
	v := make([]int32, n)
	for i := range v {
		v[i] = d.i32()
	}
	return v
}

func (d *decoder) strs() []string {
	n := d.count(4) // each string takes at least its 4-byte length
	if n == 0 {
		return nil
	}
	v := make([]string, n)
	for i := range v {
		v[i] = d.str()
	}
	return v
}

func (d *decoder) tile() TileID { return TileID{Col: d.int(), Row: d.int()} }

func (d *decoder) target() reach.Target {
	return reach.Target{Name: d.str(), Lat: d.f64(), Lon: d.f64(), Elev: d.f64(), Reserve: d.f64()}
}

func (d *decoder) targets() []reach.Target {
	n := d.count(4 + 4*8)
	if n == 0 {
		return nil
	}
	v := make([]reach.Target, n)
	for i := range v {
		v[i] = d.target()
	}
	return v
}

// end reports the first error, or bytes left after the last field.
func (d *decoder) end() error {
	if d.err == nil && len(d.b) != 0 {
		d.fail("%d bytes after the last field", len(d.b))
	}
	return d.err
}

func encodePlan(p *Plan) []byte {
	size := 256 + 64*(len(p.Fields)+len(p.Candidates))
	for _, m := range p.Models {
		size += 48 + 8*len(m.Values)
	}
	e := newEncoder(kindPlan, size)
	l := p.Lattice
	e.int(l.EPSG)
	e.f64(l.X0)
	e.f64(l.Y0)
	e.f64(l.DX)
	e.f64(l.DY)
	e.int(l.Cols)
	e.int(l.Rows)
	e.int(p.Tile)
	for _, ts := range [][]reach.Target{p.Fields, p.Candidates} {
		e.count(len(ts))
		for _, t := range ts {
			e.target(t)
		}
	}
	e.count(len(p.Models))
	for _, m := range p.Models {
		e.f64(m.HMin)
		e.f64(m.HMax)
		e.int(m.Rows)
		e.int(m.Dirs)
		e.f64s(m.Values)
	}
	e.f64(p.Clearance)
	e.f64(p.Alt)
	e.bool(p.AGL)
	e.f64(p.Ceiling)
	e.f64(p.Cell)
	e.f64(p.Flat)
	e.strs(p.Notes)
	return e.done()
}

func decodePlan(data []byte) (*Plan, error) {
	d := newDecoder(data, kindPlan, "plan")
	var p Plan
	p.Lattice = Lattice{EPSG: d.int(), X0: d.f64(), Y0: d.f64(), DX: d.f64(), DY: d.f64(), Cols: d.int(), Rows: d.int()}
	p.Tile = d.int()
	p.Fields = d.targets()
	p.Candidates = d.targets()
	if n := d.count(4 * 8); n > 0 {
		p.Models = make([]LossGrid, n)
		for i := range p.Models {
			p.Models[i] = LossGrid{HMin: d.f64(), HMax: d.f64(), Rows: d.int(), Dirs: d.int(), Values: d.f64s()}
		}
	}
	p.Clearance = d.f64()
	p.Alt = d.f64()
	p.AGL = d.bool()
	p.Ceiling = d.f64()
	p.Cell = d.f64()
	p.Flat = d.f64()
	p.Notes = d.strs()
	if err := d.end(); err != nil {
		return nil, err
	}
	return &p, nil
}

func encodeTileResult(t *TileResult) []byte {
	n := len(t.Least)
	e := newEncoder(kindTileResult, 13*n+len(t.Mask)+8*len(t.BlockAreas)+256)
	e.tile(t.Tile)
	e.int(t.C0)
	e.int(t.R0)
	e.int(t.Cols)
	e.int(t.Rows)
	e.f32s(t.Least)
	e.i32s(t.Best)
	e.u8s(t.Count)
	e.f32s(t.Flown)
	e.u8s(t.Mask)
	e.f64s(t.BlockAreas)
	e.int(int(t.ZoneCells))
	e.int(int(t.CoveredCells))
	e.f64(t.ZoneArea)
	e.f64(t.CoveredArea)
	e.count(len(t.Fields))
	for _, f := range t.Fields {
		e.int(f.Field)
		e.f64(f.Covers)
		e.f64(f.Exclusive)
	}
	e.count(len(t.Gains))
	for _, g := range t.Gains {
		e.int(g.Field)
		e.i32s(g.Cells)
		e.f64(g.Area)
	}
	return e.done()
}

func decodeTileResult(data []byte) (*TileResult, error) {
	d := newDecoder(data, kindTileResult, "tile result")
	var t TileResult
	t.Tile = d.tile()
	t.C0, t.R0, t.Cols, t.Rows = d.int(), d.int(), d.int(), d.int()
	t.Least = d.f32s()
	t.Best = d.i32s()
	t.Count = d.u8s()
	t.Flown = d.f32s()
	t.Mask = d.u8s()
	t.BlockAreas = d.f64s()
	t.ZoneCells, t.CoveredCells = int64(d.int()), int64(d.int())
	t.ZoneArea, t.CoveredArea = d.f64(), d.f64()
	if n := d.count(3 * 8); n > 0 {
		t.Fields = make([]FieldArea, n)
		for i := range t.Fields {
			t.Fields[i] = FieldArea{Field: d.int(), Covers: d.f64(), Exclusive: d.f64()}
		}
	}
	if n := d.count(3 * 8); n > 0 {
		t.Gains = make([]CandidateCells, n)
		for i := range t.Gains {
			t.Gains[i] = CandidateCells{Field: d.int(), Cells: d.i32s(), Area: d.f64()}
		}
	}
	if err := d.end(); err != nil {
		return nil, err
	}
	return &t, nil
}

func encodeTilePart(t *TilePart) []byte {
	e := newEncoder(kindTilePart, 64+4*len(t.Least))
	e.tile(t.Tile)
	e.int(t.Field)
	e.int(t.C0)
	e.int(t.R0)
	e.int(t.W)
	e.int(t.H)
	e.f32s(t.Least)
	return e.done()
}

func decodeTilePart(data []byte) (*TilePart, error) {
	d := newDecoder(data, kindTilePart, "tile part")
	var t TilePart
	t.Tile = d.tile()
	t.Field, t.C0, t.R0, t.W, t.H = d.int(), d.int(), d.int(), d.int(), d.int()
	t.Least = d.f32s()
	if err := d.end(); err != nil {
		return nil, err
	}
	return &t, nil
}
