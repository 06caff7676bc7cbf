package fgb

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"

	"github.com/paulmach/orb"
)

// Magic is the file signature: "fgb", major version 3, "fgb", patch 0.
var Magic = [8]byte{'f', 'g', 'b', 3, 'f', 'g', 'b', 0}

// ColumnType is the type of a property column (the spec's ColumnType).
type ColumnType uint8

// The column types the writer supports.
const (
	Long   ColumnType = 7  // int64 (Go int, int64)
	Double ColumnType = 10 // float64
	String ColumnType = 11 // UTF-8
)

// Column is one property column.
type Column struct {
	Name string
	Type ColumnType
}

// Header describes the file: Name of the layer, its CRS by EPSG code
// (4326 for lon/lat), the columns, a title and a description.
type Header struct {
	Name, Title, Description string
	EPSG                     int
	Columns                  []Column
}

// Feature is a geometry (orb.Point, orb.Polygon or orb.MultiPolygon, in
// the header's CRS: x = longitude, y = latitude for EPSG:4326) and one
// property value per column (nil for none; float64 for Double, string for
// String, int or int64 for Long).
type Feature struct {
	Geometry   orb.Geometry
	Properties []any
}

// geometry types of the spec.
const (
	typeUnknown      = 0
	typePoint        = 1
	typePolygon      = 3
	typeMultiPolygon = 6
)

func geomType(g orb.Geometry) (uint8, error) {
	switch g.(type) {
	case orb.Point:
		return typePoint, nil
	case orb.Polygon:
		return typePolygon, nil
	case orb.MultiPolygon:
		return typeMultiPolygon, nil
	}
	return 0, fmt.Errorf("fgb: geometry %T is not a Point, Polygon or MultiPolygon", g)
}

// Write writes the header and the features to w. The header's geometry
// type is the features' when they all share one, else Unknown (each
// geometry then carries its own type).
func Write(w io.Writer, h Header, features []Feature) error {
	gt := -1
	env := orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}
	for i, f := range features {
		t, err := geomType(f.Geometry)
		if err != nil {
			return fmt.Errorf("fgb: feature %d: %w", i, err)
		}
		if len(f.Properties) != len(h.Columns) {
			return fmt.Errorf("fgb: feature %d has %d properties for %d columns", i, len(f.Properties), len(h.Columns))
		}
		if gt == -1 {
			gt = int(t)
		} else if gt != int(t) {
			gt = typeUnknown
		}
		if hasPoints(f.Geometry) {
			env = env.Union(f.Geometry.Bound())
		}
	}
	if gt < 0 {
		gt = typeUnknown
	}
	bw := bufio.NewWriterSize(w, 1<<20)
	bw.Write(Magic[:])
	hb := header(h, uint8(gt), env, uint64(len(features)))
	writePrefixed(bw, hb)
	b := newBuilder(1 << 12)
	for i, f := range features {
		data, err := feature(b, h, f, gt == typeUnknown)
		if err != nil {
			return fmt.Errorf("fgb: feature %d: %w", i, err)
		}
		writePrefixed(bw, data)
	}
	return bw.Flush()
}

func writePrefixed(w *bufio.Writer, data []byte) {
	var n [4]byte
	binary.LittleEndian.PutUint32(n[:], uint32(len(data)))
	w.Write(n[:])
	w.Write(data)
}

// header encodes the Header table (field ids of header.fbs: 0 name,
// 1 envelope, 2 geometry_type, 7 columns, 8 features_count, 9
// index_node_size, 10 crs, 11 title, 12 description).
func header(h Header, gt uint8, env orb.Bound, n uint64) []byte {
	b := newBuilder(1024)
	cols := make([]int, len(h.Columns))
	for i, c := range h.Columns {
		name := b.str(c.Name)
		b.start()
		b.fieldRef(0, name)
		b.fieldU8(1, uint8(c.Type))
		cols[i] = b.end()
	}
	colVec := b.refVec(cols)
	org := b.str("EPSG")
	b.start()
	b.fieldI32(1, int32(h.EPSG))
	b.fieldRef(0, org)
	crs := b.end()
	name := b.str(h.Name)
	title := b.str(h.Title)
	desc := b.str(h.Description)
	envVec := -1
	if env.Min[0] <= env.Max[0] {
		envVec = b.f64Vec([]float64{env.Min[0], env.Min[1], env.Max[0], env.Max[1]})
	}
	b.start()
	b.fieldU64(8, n)
	b.fieldRef(0, name)
	if envVec >= 0 {
		b.fieldRef(1, envVec)
	}
	b.fieldRef(7, colVec)
	b.fieldRef(10, crs)
	b.fieldRef(11, title)
	b.fieldRef(12, desc)
	b.fieldU16(9, 0) // no spatial index
	b.fieldU8(2, gt)
	return b.finish(b.end())
}

func hasPoints(g orb.Geometry) bool {
	if _, ok := g.(orb.Point); ok {
		return true
	}
	for _, p := range ringsOf(g) {
		for _, r := range p {
			if len(r) > 0 {
				return true
			}
		}
	}
	return false
}

// ringsOf returns the polygons of g.
func ringsOf(g orb.Geometry) []orb.Polygon {
	switch v := g.(type) {
	case orb.Polygon:
		return []orb.Polygon{v}
	case orb.MultiPolygon:
		return v
	}
	return nil
}

// polygonGeom writes a Geometry table of one polygon (ids: 0 ends, 1 xy,
// 6 type) and returns its off.
func polygonGeom(b *builder, p orb.Polygon, typ uint8, withType bool) int {
	var xy []float64
	var ends []uint32
	for _, r := range p {
		for _, pt := range r {
			xy = append(xy, pt[0], pt[1])
		}
		ends = append(ends, uint32(len(xy)/2))
	}
	xyv := b.f64Vec(xy)
	endv := -1
	if len(ends) > 1 {
		endv = b.u32Vec(ends)
	}
	b.start()
	if endv >= 0 {
		b.fieldRef(0, endv)
	}
	b.fieldRef(1, xyv)
	if withType {
		b.fieldU8(6, typ)
	}
	return b.end()
}

// feature encodes a Feature table (ids: 0 geometry, 1 properties).
func feature(b *builder, h Header, f Feature, typed bool) ([]byte, error) {
	*b = builder{b: b.b, head: len(b.b), fields: b.fields[:0]}
	props, err := properties(h, f.Properties)
	if err != nil {
		return nil, err
	}
	pv := b.bytesVec(props)
	var geom int
	switch g := f.Geometry.(type) {
	case orb.Point:
		xyv := b.f64Vec([]float64{g[0], g[1]})
		b.start()
		b.fieldRef(1, xyv)
		if typed {
			b.fieldU8(6, typePoint)
		}
		geom = b.end()
	case orb.Polygon:
		geom = polygonGeom(b, g, typePolygon, typed)
	case orb.MultiPolygon:
		parts := make([]int, len(g))
		for i, p := range g {
			parts[i] = polygonGeom(b, p, typePolygon, true)
		}
		pvec := b.refVec(parts)
		b.start()
		b.fieldRef(7, pvec)
		b.fieldU8(6, typeMultiPolygon)
		geom = b.end()
	}
	b.start()
	b.fieldRef(0, geom)
	b.fieldRef(1, pv)
	return b.finish(b.end()), nil
}

// properties encodes the property buffer: for each non-nil value its
// column index (uint16) and the value.
func properties(h Header, vals []any) ([]byte, error) {
	var out []byte
	for i, v := range vals {
		if v == nil {
			continue
		}
		out = binary.LittleEndian.AppendUint16(out, uint16(i))
		c := h.Columns[i]
		switch c.Type {
		case Double:
			x, ok := v.(float64)
			if !ok {
				return nil, fmt.Errorf("column %q wants a float64, not %T", c.Name, v)
			}
			out = binary.LittleEndian.AppendUint64(out, math.Float64bits(x))
		case Long:
			var x int64
			switch n := v.(type) {
			case int:
				x = int64(n)
			case int64:
				x = n
			default:
				return nil, fmt.Errorf("column %q wants an integer, not %T", c.Name, v)
			}
			out = binary.LittleEndian.AppendUint64(out, uint64(x))
		case String:
			s, ok := v.(string)
			if !ok {
				return nil, fmt.Errorf("column %q wants a string, not %T", c.Name, v)
			}
			out = binary.LittleEndian.AppendUint32(out, uint32(len(s)))
			out = append(out, s...)
		default:
			return nil, fmt.Errorf("column %q has unsupported type %d", c.Name, c.Type)
		}
	}
	return out, nil
}
