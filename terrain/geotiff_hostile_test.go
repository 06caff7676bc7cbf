package terrain

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"math"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// tiffTestField is one IFD entry of a hand-built TIFF: integer values for
// BYTE/SHORT/LONG, doubles for DOUBLE, text for ASCII.
type tiffTestField struct {
	tag, typ int
	ints     []uint64
	dbls     []float64
	text     string
}

// buildTestTIFF lays out a classic TIFF (TIFF 6.0 §2): the 8-byte header,
// payload at offset 8 (strip and tile offsets given to it are absolute, so
// the first payload byte is at 8), then the IFD and out-of-line values.
func buildTestTIFF(order binary.ByteOrder, fields []tiffTestField, payload []byte) []byte {
	fields = slices.Clone(fields)
	slices.SortFunc(fields, func(a, b tiffTestField) int { return a.tag - b.tag })
	var out bytes.Buffer
	if order == binary.BigEndian {
		out.WriteString("MM")
	} else {
		out.WriteString("II")
	}
	b2, b4, b8 := make([]byte, 2), make([]byte, 4), make([]byte, 8)
	ifd := 8 + len(payload)
	ifd += ifd & 1
	order.PutUint16(b2, 42)
	out.Write(b2)
	order.PutUint32(b4, uint32(ifd))
	out.Write(b4)
	out.Write(payload)
	for out.Len() < ifd {
		out.WriteByte(0)
	}
	valuesAt := ifd + 2 + 12*len(fields) + 4
	var values bytes.Buffer
	order.PutUint16(b2, uint16(len(fields)))
	out.Write(b2)
	for _, f := range fields {
		var data []byte
		count := 0
		switch f.typ {
		case tiffTypeShort:
			for _, v := range f.ints {
				order.PutUint16(b2, uint16(v))
				data = append(data, b2...)
			}
			count = len(f.ints)
		case tiffTypeLong:
			for _, v := range f.ints {
				order.PutUint32(b4, uint32(v))
				data = append(data, b4...)
			}
			count = len(f.ints)
		case tiffTypeDouble:
			for _, v := range f.dbls {
				order.PutUint64(b8, math.Float64bits(v))
				data = append(data, b8...)
			}
			count = len(f.dbls)
		case tiffTypeASCII:
			data = append([]byte(f.text), 0)
			count = len(data)
		}
		order.PutUint16(b2, uint16(f.tag))
		out.Write(b2)
		order.PutUint16(b2, uint16(f.typ))
		out.Write(b2)
		order.PutUint32(b4, uint32(count))
		out.Write(b4)
		if len(data) <= 4 {
			v := make([]byte, 4)
			copy(v, data)
			out.Write(v)
		} else {
			order.PutUint32(b4, uint32(valuesAt+values.Len()))
			out.Write(b4)
			values.Write(data)
			if values.Len()&1 == 1 {
				values.WriteByte(0)
			}
		}
	}
	out.Write(make([]byte, 4)) // no next IFD
	out.Write(values.Bytes())
	return out.Bytes()
}

// geotiffTestFields are the fields of a w × h int16 raster at 3″ cells near
// 0 N, 25 W (WGS84), with the given strip or tile layout fields added.
func geotiffTestFields(w, h uint64, layout ...tiffTestField) []tiffTestField {
	f := []tiffTestField{
		{tag: tiffTagWidth, typ: tiffTypeLong, ints: []uint64{w}},
		{tag: tiffTagHeight, typ: tiffTypeLong, ints: []uint64{h}},
		{tag: tiffTagBitsPerSample, typ: tiffTypeShort, ints: []uint64{16}},
		{tag: tiffTagSampleFormat, typ: tiffTypeShort, ints: []uint64{2}},
		{tag: tiffTagPixelScale, typ: tiffTypeDouble, dbls: []float64{1.0 / 1200, 1.0 / 1200, 0}},
		{tag: tiffTagTiepoint, typ: tiffTypeDouble, dbls: []float64{0, 0, 0, -25.05, 0.0375, 0}},
		{tag: tiffTagGeoKeyDirectory, typ: tiffTypeShort, ints: []uint64{1, 1, 0, 3,
			geoKeyModelType, 0, 1, geoModelTypeGeographic,
			geoKeyRasterType, 0, 1, geoRasterPixelIsArea,
			geoKeyGeographicType, 0, 1, 4326}},
	}
	return append(f, layout...)
}

func stripFields(rps uint64, offsets, counts []uint64, compression uint64) []tiffTestField {
	return []tiffTestField{
		{tag: tiffTagRowsPerStrip, typ: tiffTypeLong, ints: []uint64{rps}},
		{tag: tiffTagStripOffsets, typ: tiffTypeLong, ints: offsets},
		{tag: tiffTagStripByteCounts, typ: tiffTypeLong, ints: counts},
		{tag: tiffTagCompression, typ: tiffTypeShort, ints: []uint64{compression}},
	}
}

func repeatU(v uint64, n int) []uint64 {
	s := make([]uint64, n)
	for i := range s {
		s[i] = v
	}
	return s
}

// replaceField returns fields with the field of tag replaced (or added).
func replaceField(fields []tiffTestField, nf tiffTestField) []tiffTestField {
	out := slices.DeleteFunc(slices.Clone(fields), func(f tiffTestField) bool { return f.tag == nf.tag })
	return append(out, nf)
}

// allocDuring returns the bytes allocated while f runs.
func allocDuring(f func()) uint64 {
	var a, b runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&a)
	f()
	runtime.ReadMemStats(&b)
	return b.TotalAlloc - a.TotalAlloc
}

func readTestTIFF(data []byte) (*Grid, error) {
	info, err := ReadGeoTIFFInfo(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		return nil, err
	}
	w, s, e, n := info.Extent()
	return ReadGeoTIFFWindow(bytes.NewReader(data), int64(len(data)), w, s, e, n)
}

// TestGeoTIFFHostile feeds malformed and hostile files, each built by hand
// after the TIFF 6.0 layout, and expects a clear error of the right type
// with bounded allocation.
func TestGeoTIFFHostile(t *testing.T) {
	le := binary.LittleEndian
	cells := make([]byte, 2*16*16)
	// A deflate bomb: 16 MB of zeros for a strip that should hold 512 bytes.
	var bomb bytes.Buffer
	zw, _ := zlib.NewWriterLevel(&bomb, zlib.BestCompression)
	zero := make([]byte, 1<<20)
	for range 16 {
		zw.Write(zero)
	}
	zw.Close()
	var small bytes.Buffer
	zw = zlib.NewWriter(&small)
	noise := make([]byte, len(cells))
	for i := range noise {
		noise[i] = byte(i * i * 7919 >> 3)
	}
	zw.Write(noise)
	zw.Close()
	n16 := uint64(len(cells))
	tiles30k := (30000 + 255) / 256 * ((30000 + 255) / 256)

	type kind int
	const (
		format kind = iota
		unsup
		other
	)
	for _, tc := range []struct {
		name     string
		data     []byte
		want     kind
		msg      string // part of the message
		maxAlloc uint64 // bytes; 0 = not checked
	}{
		{"not a TIFF", []byte("GIF89a\x00\x00\x00\x00"), format, "not a TIFF", 0},
		{"empty", nil, format, "too short", 0},
		{"IFD past the end", []byte("II*\x00\xff\xff\x00\x00"), format, "past the end", 0},
		{"dimensions 1e9 × 1e9",
			buildTestTIFF(le, geotiffTestFields(1e9, 1e9, stripFields(1e9, []uint64{8}, []uint64{n16}, 1)...), cells),
			format, "over the limit", 1 << 20},
		{"1e9 columns, one-row strips",
			buildTestTIFF(le, geotiffTestFields(1e9, 2, stripFields(1, []uint64{8, 8}, []uint64{n16, n16}, 1)...), cells),
			format, "over the limit", 1 << 20},
		{"30000 × 30000 full read over the cell cap",
			buildTestTIFF(le, geotiffTestFields(30000, 30000,
				tiffTestField{tag: tiffTagTileWidth, typ: tiffTypeLong, ints: []uint64{256}},
				tiffTestField{tag: tiffTagTileLength, typ: tiffTypeLong, ints: []uint64{256}},
				tiffTestField{tag: tiffTagTileOffsets, typ: tiffTypeLong, ints: repeatU(8, tiles30k)},
				tiffTestField{tag: tiffTagTileByteCounts, typ: tiffTypeLong, ints: repeatU(n16, tiles30k)},
			), cells),
			other, "over the limit of " + strconv.Itoa(MaxCells) + " cells", 2 << 20},
		{"strip offset past the end",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{1 << 30}, []uint64{n16}, 1)...), cells),
			format, "runs past the end", 0},
		{"strip count past the end",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{1 << 31}, 1)...), cells),
			format, "runs past the end", 0},
		{"zero tiles",
			buildTestTIFF(le, geotiffTestFields(16, 16,
				tiffTestField{tag: tiffTagTileWidth, typ: tiffTypeLong, ints: []uint64{16}},
				tiffTestField{tag: tiffTagTileLength, typ: tiffTypeLong, ints: []uint64{16}},
				tiffTestField{tag: tiffTagTileOffsets, typ: tiffTypeLong, ints: nil},
				tiffTestField{tag: tiffTagTileByteCounts, typ: tiffTypeLong, ints: nil},
			), cells),
			format, "want 1", 0},
		{"tile width 0",
			buildTestTIFF(le, geotiffTestFields(16, 16,
				tiffTestField{tag: tiffTagTileWidth, typ: tiffTypeLong, ints: []uint64{0}},
				tiffTestField{tag: tiffTagTileLength, typ: tiffTypeLong, ints: []uint64{16}},
				tiffTestField{tag: tiffTagTileOffsets, typ: tiffTypeLong, ints: []uint64{8}},
				tiffTestField{tag: tiffTagTileByteCounts, typ: tiffTypeLong, ints: []uint64{n16}},
			), cells),
			format, "tiles of 0 × 16", 0},
		{"RowsPerStrip 0",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(0, []uint64{8}, []uint64{n16}, 1)...), cells),
			format, "RowsPerStrip (278) is 0", 0},
		{"deflate bomb",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{uint64(bomb.Len())}, 8)...), bomb.Bytes()),
			format, "decodes to more than its 512 bytes", uint64(bomb.Len()) + 1<<20},
		{"deflate truncated",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{uint64(small.Len() / 2)}, 8)...), small.Bytes()),
			format, "strip 0", 0},
		{"uncompressed strip too short",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{100}, 1)...), cells),
			format, "has 100 bytes, want 512", 0},
		{"LZW garbage",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 5)...), bytes.Repeat([]byte{0xff}, len(cells))),
			format, "strip 0", 0},
		{"PackBits truncated",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{2}, 32773)...), []byte{0x7f, 0x01}),
			format, "truncated", 0},
		{"JPEG compression",
			buildTestTIFF(le, geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 7)...), cells),
			unsup, "Compression (259) 7", 0},
		{"uint8 samples",
			buildTestTIFF(le, replaceField(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				tiffTestField{tag: tiffTagBitsPerSample, typ: tiffTypeShort, ints: []uint64{8}}), cells),
			unsup, "SampleFormat (339) 2 with BitsPerSample (258) 8", 0},
		{"floating-point predictor on integers",
			buildTestTIFF(le, append(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 8)...),
				tiffTestField{tag: tiffTagPredictor, typ: tiffTypeShort, ints: []uint64{3}}), cells),
			unsup, "Predictor (317) 3 with int16 samples", 0},
		{"unknown predictor",
			buildTestTIFF(le, append(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 8)...),
				tiffTestField{tag: tiffTagPredictor, typ: tiffTypeShort, ints: []uint64{34892}}), cells),
			unsup, "Predictor (317) 34892", 0},
		{"web mercator",
			buildTestTIFF(le, replaceField(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				tiffTestField{tag: tiffTagGeoKeyDirectory, typ: tiffTypeShort, ints: []uint64{1, 1, 0, 2,
					geoKeyModelType, 0, 1, geoModelTypeProjected, geoKeyProjectedCSType, 0, 1, 3857}}), cells),
			unsup, "ProjectedCSTypeGeoKey (3072) 3857", 0},
		{"NAD83 geographic",
			buildTestTIFF(le, replaceField(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				tiffTestField{tag: tiffTagGeoKeyDirectory, typ: tiffTypeShort, ints: []uint64{1, 1, 0, 1,
					geoKeyGeographicType, 0, 1, 4269}}), cells),
			unsup, "GeographicTypeGeoKey (2048) 4269", 0},
		{"no GeoKeyDirectory",
			buildTestTIFF(le, slices.DeleteFunc(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				func(f tiffTestField) bool { return f.tag == tiffTagGeoKeyDirectory }), cells),
			format, "GeoKeyDirectory (34735) missing", 0},
		{"no georeference",
			buildTestTIFF(le, slices.DeleteFunc(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				func(f tiffTestField) bool { return f.tag == tiffTagTiepoint }), cells),
			format, "no georeference", 0},
		{"ground control points",
			buildTestTIFF(le, replaceField(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				tiffTestField{tag: tiffTagTiepoint, typ: tiffTypeDouble, dbls: []float64{0, 0, 0, -25, 0, 0, 15, 15, 0, -24.9, -0.1, 0}}), cells),
			unsup, "ModelTiepoint (33922) with 2 tiepoints", 0},
		{"south-up scale",
			buildTestTIFF(le, replaceField(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				tiffTestField{tag: tiffTagPixelScale, typ: tiffTypeDouble, dbls: []float64{0.001, -0.001, 0}}), cells),
			unsup, "north-up", 0},
		{"bad GDAL_NODATA",
			buildTestTIFF(le, append(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{n16}, 1)...),
				tiffTestField{tag: tiffTagGDALNoData, typ: tiffTypeASCII, text: "none"}), cells),
			format, `GDAL_NODATA (42113) is "none"`, 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var err error
			alloc := allocDuring(func() { _, err = readTestTIFF(tc.data) })
			if err == nil {
				t.Fatal("no error")
			}
			t.Logf("%v (allocated %d bytes)", err, alloc)
			var fe *GeoTIFFFormatError
			var ue *GeoTIFFUnsupportedError
			switch {
			case tc.want == format && !errors.As(err, &fe):
				t.Errorf("error %v (%T), want *GeoTIFFFormatError", err, err)
			case tc.want == unsup && !errors.As(err, &ue):
				t.Errorf("error %v (%T), want *GeoTIFFUnsupportedError", err, err)
			}
			if !strings.Contains(err.Error(), tc.msg) || !strings.HasPrefix(err.Error(), "terrain: geotiff: ") {
				t.Errorf("message %q, want the prefix \"terrain: geotiff: \" and %q", err, tc.msg)
			}
			if tc.maxAlloc > 0 && alloc > tc.maxAlloc {
				t.Errorf("allocated %d bytes, want ≤ %d", alloc, tc.maxAlloc)
			}
		})
	}
}

// TestGeoTIFFHandBuilt covers what GDAL did not make: a north-up
// ModelTransformation, a sparse tile, a big-endian uncompressed file and a
// small window of a 30000 × 30000 raster.
func TestGeoTIFFHandBuilt(t *testing.T) {
	cells := make([]byte, 2*16*16)
	for i := range 256 {
		binary.LittleEndian.PutUint16(cells[2*i:], uint16(int16(i-100)))
	}
	// OGC GeoTIFF 1.1: X = a·I + d, Y = f·J + h for a transformation matrix
	// without rotation; the same raster as a tiepoint at (-25.05, 0.0375)
	// with 0.001 cells.
	tr := buildTestTIFF(binary.LittleEndian, replaceField(slices.DeleteFunc(
		geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{512}, 1)...),
		func(f tiffTestField) bool { return f.tag == tiffTagTiepoint || f.tag == tiffTagPixelScale }),
		tiffTestField{tag: tiffTagTransformation, typ: tiffTypeDouble, dbls: []float64{
			0.001, 0, 0, -25.05,
			0, -0.001, 0, 0.0375,
			0, 0, 0, 0,
			0, 0, 0, 1}}), cells)
	g, err := readTestTIFF(tr)
	if err != nil {
		t.Fatal(err)
	}
	if !geotiffClose(g.X0, -25.0495, 1e-12) || !geotiffClose(g.Y0, 0.0370, 1e-12) || !geotiffClose(g.DX, 0.001, 1e-15) || g.Elev[17] != -83 {
		t.Errorf("transformation: X0 %.10g Y0 %.10g DX %g cell 17 = %g, want -25.0495 0.037 0.001 -83", g.X0, g.Y0, g.DX, g.Elev[17])
	}

	// Big endian, uncompressed, with GDAL_NODATA -100: cell 0 is no data.
	be := make([]byte, len(cells))
	for i := range 256 {
		binary.BigEndian.PutUint16(be[2*i:], binary.LittleEndian.Uint16(cells[2*i:]))
	}
	g, err = readTestTIFF(buildTestTIFF(binary.BigEndian, append(geotiffTestFields(16, 16, stripFields(16, []uint64{8}, []uint64{512}, 1)...),
		tiffTestField{tag: tiffTagGDALNoData, typ: tiffTypeASCII, text: " -100"}), be))
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(float64(g.Elev[0])) || g.Elev[255] != 155 {
		t.Errorf("big endian: cells 0, 255 = %g, %g, want NaN, 155", g.Elev[0], g.Elev[255])
	}

	// Two 16 × 16 tiles across, the second sparse (offset 0, count 0, as
	// GDAL's SPARSE_OK writes it): no data where a no-data value is declared.
	g, err = readTestTIFF(buildTestTIFF(binary.LittleEndian, append(geotiffTestFields(32, 16,
		tiffTestField{tag: tiffTagTileWidth, typ: tiffTypeShort, ints: []uint64{16}},
		tiffTestField{tag: tiffTagTileLength, typ: tiffTypeShort, ints: []uint64{16}},
		tiffTestField{tag: tiffTagTileOffsets, typ: tiffTypeLong, ints: []uint64{8, 0}},
		tiffTestField{tag: tiffTagTileByteCounts, typ: tiffTypeLong, ints: []uint64{512, 0}}),
		tiffTestField{tag: tiffTagGDALNoData, typ: tiffTypeASCII, text: "-32768"}), cells))
	if err != nil {
		t.Fatal(err)
	}
	if g.Elev[1] != -99 || !math.IsNaN(float64(g.Elev[16])) {
		t.Errorf("sparse tile: cells 1, 16 = %g, %g, want -99, NaN", g.Elev[1], g.Elev[16])
	}

	// A 30000 × 30000 raster whose tiles all point at one 256 × 256 tile:
	// a small window reads only the tiles it needs.
	tile := make([]byte, 2*256*256)
	for i := range 256 * 256 {
		binary.LittleEndian.PutUint16(tile[2*i:], uint16(i%256+(i/256)))
	}
	nt := (30000 + 255) / 256 * ((30000 + 255) / 256)
	big := buildTestTIFF(binary.LittleEndian, geotiffTestFields(30000, 30000,
		tiffTestField{tag: tiffTagTileWidth, typ: tiffTypeLong, ints: []uint64{256}},
		tiffTestField{tag: tiffTagTileLength, typ: tiffTypeLong, ints: []uint64{256}},
		tiffTestField{tag: tiffTagTileOffsets, typ: tiffTypeLong, ints: repeatU(8, nt)},
		tiffTestField{tag: tiffTagTileByteCounts, typ: tiffTypeLong, ints: repeatU(uint64(len(tile)), nt)}), tile)
	info, err := ReadGeoTIFFInfo(bytes.NewReader(big), int64(len(big)))
	if err != nil {
		t.Fatal(err)
	}
	x, y := info.X0+20000.5*info.DX, info.Y0-15000.5*info.DY
	var win *Grid
	alloc := allocDuring(func() {
		win, err = ReadGeoTIFFWindow(bytes.NewReader(big), int64(len(big)), x, y-9*info.DY, x+9*info.DX, y)
	})
	if err != nil {
		t.Fatal(err)
	}
	// Cell (20000, 15000) is cell (20000 mod 256, 15000 mod 256) = (32, 152)
	// of the shared tile: 32 + 152 = 184.
	if win.Cols != 11 || win.Rows != 11 || win.Elev[0] != 184 {
		t.Errorf("window %d × %d, first cell %g, want 11 × 11 and 184", win.Cols, win.Rows, win.Elev[0])
	}
	if alloc > 4<<20 {
		t.Errorf("small window of a large raster allocated %d bytes", alloc)
	}
}

// TestGeoTIFFTruncated cuts GDAL fixtures short, passing either the true
// size or the original one (a reader that ends early): always an error.
func TestGeoTIFFTruncated(t *testing.T) {
	for _, name := range []string{"geo_int16_strip_none.tif", "geo_float32_tiled_deflate_pred3.tif", "geo_float32_bigtiff_tiled_deflate.tif"} {
		data := readGeoTIFFFixture(t, name)
		for _, cut := range []int{4, 100, len(data) / 3, len(data) - 10} {
			for _, size := range []int64{int64(cut), int64(len(data))} {
				r := bytes.NewReader(data[:cut])
				_, err := ReadGeoTIFFWindow(r, size, -180, -90, 180, 90)
				if err == nil {
					t.Errorf("%s cut at %d (size %d): no error", name, cut, size)
				}
			}
		}
	}
}
