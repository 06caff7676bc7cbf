package terrain

import (
	"bufio"
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
)

// WriteGeoTIFF writes g as a single-band float32 GeoTIFF that GDAL and GIS
// programs read: 256 × 256 tiles, deflate, a tiepoint and pixel scale
// (RasterPixelIsArea), the EPSG code of g.CRS as GeographicTypeGeoKey (4326)
// or ProjectedCSTypeGeoKey (UTM), and GDAL_NODATA "nan" when g holds NaN
// cells. It is GeoTIFFWriter{}.Write(w, g).
func WriteGeoTIFF(w io.Writer, g *Grid) error {
	return GeoTIFFWriter{}.Write(w, g)
}

// GeoTIFFWriter holds the layout choices of a GeoTIFF written from a Grid.
// The zero value writes 256 × 256 deflate tiles without a predictor, little
// endian, which is GDAL's COMPRESS=DEFLATE TILED=YES.
type GeoTIFFWriter struct {
	Uncompressed bool // store the samples as they are (Compression 1)
	Predictor    bool // floating-point predictor 3 (smaller files with deflate)
	BigEndian    bool // byte order "MM"
	// Strips writes strips of RowsPerStrip rows instead of tiles;
	// RowsPerStrip 0 means as many rows as fit in 64 KiB (at least 1).
	Strips       bool
	RowsPerStrip int
	// Tile is the tile side in cells, a multiple of 16 (TIFF 6.0); 0 means
	// 256.
	Tile int
	// Description, when not empty, is written as ImageDescription (TIFF
	// tag 270, ASCII; gdalinfo shows it as TIFFTAG_IMAGEDESCRIPTION): what
	// the values are, and the caution that goes with them.
	Description string
	// COG writes a cloud-optimised GeoTIFF: tiles, reduced-resolution
	// overviews down to one tile (each half the size of the level above,
	// by Overview), every IFD before the data (full resolution first, then
	// the overviews from largest to smallest), the tile data of the
	// smallest overview first and of the full resolution last, each tile
	// row-major within its level, and GDAL's structural-metadata block
	// after the header (LAYOUT=IFDS_BEFORE_DATA, BLOCK_ORDER=ROW_MAJOR,
	// each tile preceded by its size as a little-endian uint32 and
	// followed by its last 4 bytes repeated), as GDAL's COG driver writes
	// them. Little endian only; tiles only (not Strips).
	COG bool
	// Overview picks how an overview cell is made from the (up to) 2 × 2
	// cells it covers at the level above; nil means OverviewMax.
	Overview func(v []float32) float32
}

// OverviewMax is the overview rule for quantities where higher is worse
// (a least altitude): the highest of the cells covered, and NaN when any of
// them is NaN (no value is worse than any value). It never averages, so an
// overview never shows less altitude needed than some cell under it.
func OverviewMax(v []float32) float32 {
	m := v[0]
	for _, x := range v {
		if x != x {
			return x
		}
		m = max(m, x)
	}
	return m
}

// Write writes g to w as described on GeoTIFFWriter. It builds the
// compressed chunks in memory first (the file is written in one pass, so w
// need not seek). The file must stay under 4 GiB (classic TIFF).
func (o GeoTIFFWriter) Write(w io.Writer, g *Grid) error {
	if g == nil || g.Cols <= 0 || g.Rows <= 0 || len(g.Elev) != g.Cols*g.Rows {
		return fmt.Errorf("terrain: geotiff: write: grid is empty or its Elev does not hold Cols×Rows cells")
	}
	if !(g.DX > 0) || !(g.DY > 0) || math.IsInf(g.DX, 0) || math.IsInf(g.DY, 0) ||
		math.IsNaN(g.X0) || math.IsNaN(g.Y0) || math.IsInf(g.X0, 0) || math.IsInf(g.Y0, 0) {
		return fmt.Errorf("terrain: geotiff: write: georeference X0 %g Y0 %g DX %g DY %g is not finite with positive cell sizes", g.X0, g.Y0, g.DX, g.DY)
	}
	e := g.CRS.EPSG
	geographic := e == 4326
	if !geographic && !(e >= 32601 && e <= 32660) && !(e >= 32701 && e <= 32760) && !(e >= 25828 && e <= 25838) {
		return fmt.Errorf("terrain: geotiff: write: CRS EPSG %d is not 4326, 326zz, 327zz or 258zz", e)
	}
	if o.COG {
		return o.writeCOG(w, g, e)
	}
	var order binary.ByteOrder = binary.LittleEndian
	if o.BigEndian {
		order = binary.BigEndian
	}

	// Chunk layout.
	cw, ch := o.Tile, o.Tile
	if o.Strips {
		cw, ch = g.Cols, o.RowsPerStrip
		if ch <= 0 {
			ch = max(1, 65536/(4*g.Cols))
		}
		ch = min(ch, g.Rows)
	} else {
		if cw == 0 {
			cw, ch = 256, 256
		}
		if cw < 16 || cw%16 != 0 || cw > 1<<15 {
			return fmt.Errorf("terrain: geotiff: write: tile side %d is not a multiple of 16 in 16..32768", cw)
		}
	}
	across, down := (g.Cols+cw-1)/cw, (g.Rows+ch-1)/ch

	// Encode the chunks.
	var data bytes.Buffer
	offsets := make([]uint64, 0, across*down)
	counts := make([]uint64, 0, across*down)
	row := make([]byte, 4*cw)
	tmp := make([]byte, 4*cw)
	var zw *zlib.Writer
	hasNaN := false
	for _, v := range g.Elev {
		if v != v {
			hasNaN = true
			break
		}
	}
	for ty := range down {
		for tx := range across {
			start := data.Len()
			var sink io.Writer = &data
			if !o.Uncompressed {
				if zw == nil {
					zw = zlib.NewWriter(&data)
				} else {
					zw.Reset(&data)
				}
				sink = zw
			}
			rows := ch
			if o.Strips {
				rows = min(ch, g.Rows-ty*ch)
			}
			for r := ty * ch; r < ty*ch+rows; r++ {
				clear(row)
				if r < g.Rows {
					c0 := tx * cw
					n := min(cw, g.Cols-c0)
					for i, v := range g.Elev[r*g.Cols+c0 : r*g.Cols+c0+n] {
						order.PutUint32(row[4*i:], math.Float32bits(v))
					}
				}
				if o.Predictor {
					floatPredictor(tmp, row, cw, order)
					if _, err := sink.Write(tmp); err != nil {
						return err
					}
					continue
				}
				if _, err := sink.Write(row); err != nil {
					return err
				}
			}
			if zw != nil {
				if err := zw.Close(); err != nil {
					return err
				}
			}
			offsets = append(offsets, uint64(start))
			counts = append(counts, uint64(data.Len()-start))
		}
	}

	// Tags, in ascending order (TIFF 6.0 §2).
	type field struct {
		tag, typ int
		count    int
		data     []byte
	}
	shorts, longs, doubles := tiffShorts(order), tiffLongs(order), tiffDoubles(order)
	compression := uint16(GeoTIFFDeflate)
	if o.Uncompressed {
		compression = GeoTIFFNoCompression
	}
	keys := geoKeyDirectory(e)
	fields := []field{
		{tiffTagWidth, tiffTypeLong, 1, longs(uint64(g.Cols))},
		{tiffTagHeight, tiffTypeLong, 1, longs(uint64(g.Rows))},
		{tiffTagBitsPerSample, tiffTypeShort, 1, shorts(32)},
		{tiffTagCompression, tiffTypeShort, 1, shorts(compression)},
		{262, tiffTypeShort, 1, shorts(1)}, // PhotometricInterpretation: BlackIsZero
		{tiffTagSamplesPerPixel, tiffTypeShort, 1, shorts(1)},
		{tiffTagPlanarConfig, tiffTypeShort, 1, shorts(1)},
		{tiffTagSampleFormat, tiffTypeShort, 1, shorts(3)},
		{tiffTagPixelScale, tiffTypeDouble, 3, doubles(g.DX, g.DY, 0)},
		{tiffTagTiepoint, tiffTypeDouble, 6, doubles(0, 0, 0, g.X0-g.DX/2, g.Y0+g.DY/2, 0)},
		{tiffTagGeoKeyDirectory, tiffTypeShort, len(keys), shorts(keys...)},
	}
	if o.Predictor {
		fields = append(fields, field{tiffTagPredictor, tiffTypeShort, 1, shorts(3)})
	}
	offTag, cntTag := tiffTagTileOffsets, tiffTagTileByteCounts
	if o.Strips {
		offTag, cntTag = tiffTagStripOffsets, tiffTagStripByteCounts
		fields = append(fields, field{tiffTagRowsPerStrip, tiffTypeLong, 1, longs(uint64(ch))})
	} else {
		fields = append(fields,
			field{tiffTagTileWidth, tiffTypeLong, 1, longs(uint64(cw))},
			field{tiffTagTileLength, tiffTypeLong, 1, longs(uint64(ch))})
	}
	if hasNaN {
		fields = append(fields, field{tiffTagGDALNoData, tiffTypeASCII, 4, []byte("nan\x00")})
	}
	if o.Description != "" {
		d := strings.Map(func(r rune) rune {
			if r == 0 || r > 0x7e { // 7-bit ASCII, no NUL inside (TIFF 6.0 §2)
				return '?'
			}
			return r
		}, o.Description) + "\x00"
		fields = append(fields, field{270, tiffTypeASCII, len(d), []byte(d)})
	}
	// Offsets are filled in below, once the data position is known.
	fields = append(fields,
		field{offTag, tiffTypeLong, len(offsets), longs(offsets...)},
		field{cntTag, tiffTypeLong, len(counts), longs(counts...)})
	slices.SortFunc(fields, func(a, b field) int { return a.tag - b.tag })

	// Layout: header, IFD, out-of-line values, chunk data.
	ifdSize := 2 + 12*len(fields) + 4
	pos := 8 + ifdSize
	extra := 0
	for _, f := range fields {
		if len(f.data) > 4 {
			extra += len(f.data) + len(f.data)&1 // word-aligned
		}
	}
	dataStart := uint64(pos + extra)
	if dataStart+uint64(data.Len()) > math.MaxUint32 {
		return fmt.Errorf("terrain: geotiff: write: %d bytes is too large for a classic TIFF", dataStart+uint64(data.Len()))
	}
	for i := range offsets {
		offsets[i] += dataStart
	}
	for i := range fields {
		if fields[i].tag == offTag {
			fields[i].data = longs(offsets...)
		}
	}

	bw := bufio.NewWriter(w)
	hdr := make([]byte, 8)
	if o.BigEndian {
		copy(hdr, "MM")
	} else {
		copy(hdr, "II")
	}
	order.PutUint16(hdr[2:], 42)
	order.PutUint32(hdr[4:], 8)
	bw.Write(hdr)
	ifd := make([]byte, ifdSize)
	order.PutUint16(ifd, uint16(len(fields)))
	var values []byte
	for i, f := range fields {
		ent := ifd[2+12*i:]
		order.PutUint16(ent, uint16(f.tag))
		order.PutUint16(ent[2:], uint16(f.typ))
		order.PutUint32(ent[4:], uint32(f.count))
		if len(f.data) <= 4 {
			copy(ent[8:12], f.data)
		} else {
			order.PutUint32(ent[8:], uint32(pos+len(values)))
			values = append(values, f.data...)
			if len(f.data)&1 == 1 {
				values = append(values, 0)
			}
		}
	}
	bw.Write(ifd)
	bw.Write(values)
	bw.Write(data.Bytes())
	return bw.Flush()
}

// cogLevel is one resolution level of a COG: its cells and encoded tiles.
type cogLevel struct {
	cols, rows     int
	elev           []float32
	data           [][]byte // encoded tiles, row-major
	offsets, sizes []uint64
}

// overview halves a level by rule: cell (c, r) from cells 2c..2c+1 ×
// 2r..2r+1 of l that exist.
func overview(l *cogLevel, rule func([]float32) float32) *cogLevel {
	o := &cogLevel{cols: (l.cols + 1) / 2, rows: (l.rows + 1) / 2}
	o.elev = make([]float32, o.cols*o.rows)
	buf := make([]float32, 0, 4)
	for r := range o.rows {
		for c := range o.cols {
			buf = buf[:0]
			for dr := range 2 {
				for dc := range 2 {
					if cc, rr := 2*c+dc, 2*r+dr; cc < l.cols && rr < l.rows {
						buf = append(buf, l.elev[rr*l.cols+cc])
					}
				}
			}
			o.elev[r*o.cols+c] = rule(buf)
		}
	}
	return o
}

// encodeTiles encodes the level's tiles of side t (little endian, deflate
// unless uncompressed, with the floating-point predictor if asked).
func (o GeoTIFFWriter) encodeTiles(l *cogLevel, t int) error {
	order := binary.LittleEndian
	across, down := (l.cols+t-1)/t, (l.rows+t-1)/t
	row := make([]byte, 4*t)
	tmp := make([]byte, 4*t)
	var zw *zlib.Writer
	for ty := range down {
		for tx := range across {
			var buf bytes.Buffer
			var sink io.Writer = &buf
			if !o.Uncompressed {
				if zw == nil {
					zw = zlib.NewWriter(&buf)
				} else {
					zw.Reset(&buf)
				}
				sink = zw
			}
			for r := ty * t; r < ty*t+t; r++ {
				clear(row)
				if r < l.rows {
					c0 := tx * t
					n := min(t, l.cols-c0)
					for i, v := range l.elev[r*l.cols+c0 : r*l.cols+c0+n] {
						order.PutUint32(row[4*i:], math.Float32bits(v))
					}
				}
				out := row
				if o.Predictor {
					floatPredictor(tmp, row, t, order)
					out = tmp
				}
				if _, err := sink.Write(out); err != nil {
					return err
				}
			}
			if zw != nil {
				if err := zw.Close(); err != nil {
					return err
				}
			}
			l.data = append(l.data, buf.Bytes())
		}
	}
	return nil
}

// writeCOG writes g as a cloud-optimised GeoTIFF (see GeoTIFFWriter.COG).
func (o GeoTIFFWriter) writeCOG(w io.Writer, g *Grid, epsg int) error {
	if o.BigEndian || o.Strips {
		return fmt.Errorf("terrain: geotiff: write: a COG is little endian and tiled")
	}
	t := o.Tile
	if t == 0 {
		t = 256
	}
	if t < 16 || t%16 != 0 || t > 1<<15 {
		return fmt.Errorf("terrain: geotiff: write: tile side %d is not a multiple of 16 in 16..32768", t)
	}
	rule := o.Overview
	if rule == nil {
		rule = OverviewMax
	}
	levels := []*cogLevel{{cols: g.Cols, rows: g.Rows, elev: g.Elev}}
	for l := levels[len(levels)-1]; l.cols > t || l.rows > t; l = levels[len(levels)-1] {
		levels = append(levels, overview(l, rule))
	}
	for _, l := range levels {
		if err := o.encodeTiles(l, t); err != nil {
			return err
		}
	}
	hasNaN := false
	for _, v := range g.Elev {
		if v != v {
			hasNaN = true
			break
		}
	}
	order := binary.LittleEndian
	type field struct {
		tag, typ, count int
		data            []byte
	}
	shorts, longs, doubles := tiffShorts(order), tiffLongs(order), tiffDoubles(order)
	compression := uint16(GeoTIFFDeflate)
	if o.Uncompressed {
		compression = GeoTIFFNoCompression
	}
	ifdFields := func(k int) []field {
		l := levels[k]
		n := len(l.data)
		fs := []field{
			{tiffTagWidth, tiffTypeLong, 1, longs(uint64(l.cols))},
			{tiffTagHeight, tiffTypeLong, 1, longs(uint64(l.rows))},
			{tiffTagBitsPerSample, tiffTypeShort, 1, shorts(32)},
			{tiffTagCompression, tiffTypeShort, 1, shorts(compression)},
			{262, tiffTypeShort, 1, shorts(1)}, // PhotometricInterpretation: BlackIsZero
			{tiffTagSamplesPerPixel, tiffTypeShort, 1, shorts(1)},
			{tiffTagPlanarConfig, tiffTypeShort, 1, shorts(1)},
			{tiffTagSampleFormat, tiffTypeShort, 1, shorts(3)},
			{tiffTagTileWidth, tiffTypeLong, 1, longs(uint64(t))},
			{tiffTagTileLength, tiffTypeLong, 1, longs(uint64(t))},
			{tiffTagTileOffsets, tiffTypeLong, n, longs(make([]uint64, n)...)},
			{tiffTagTileByteCounts, tiffTypeLong, n, longs(make([]uint64, n)...)},
		}
		if k > 0 {
			fs = append(fs, field{254, tiffTypeLong, 1, longs(1)}) // NewSubfileType: reduced-resolution image
		}
		if o.Predictor {
			fs = append(fs, field{tiffTagPredictor, tiffTypeShort, 1, shorts(3)})
		}
		if hasNaN {
			fs = append(fs, field{tiffTagGDALNoData, tiffTypeASCII, 4, []byte("nan\x00")})
		}
		if k == 0 {
			keys := geoKeyDirectory(epsg)
			fs = append(fs,
				field{tiffTagPixelScale, tiffTypeDouble, 3, doubles(g.DX, g.DY, 0)},
				field{tiffTagTiepoint, tiffTypeDouble, 6, doubles(0, 0, 0, g.X0-g.DX/2, g.Y0+g.DY/2, 0)},
				field{tiffTagGeoKeyDirectory, tiffTypeShort, len(keys), shorts(keys...)})
			if o.Description != "" {
				d := strings.Map(func(r rune) rune {
					if r == 0 || r > 0x7e {
						return '?'
					}
					return r
				}, o.Description) + "\x00"
				fs = append(fs, field{270, tiffTypeASCII, len(d), []byte(d)})
			}
		}
		slices.SortFunc(fs, func(a, b field) int { return a.tag - b.tag })
		return fs
	}

	// GDAL's structural metadata ("ghost area"), right after the header.
	body := "LAYOUT=IFDS_BEFORE_DATA\nBLOCK_ORDER=ROW_MAJOR\nBLOCK_LEADER=SIZE_AS_UINT4\nBLOCK_TRAILER=LAST_4_BYTES_REPEATED\nKNOWN_INCOMPATIBLE_EDITION=NO\n"
	ghost := fmt.Sprintf("GDAL_STRUCTURAL_METADATA_SIZE=%06d bytes\n", len(body)) + body
	// Layout: header, ghost, then each IFD with its out-of-line values,
	// then the data.
	all := make([][]field, len(levels))
	pos := 8 + len(ghost)
	pos += pos & 1
	ifdPos := make([]int, len(levels))
	for k := range levels {
		all[k] = ifdFields(k)
		ifdPos[k] = pos
		pos += 2 + 12*len(all[k]) + 4
		for _, f := range all[k] {
			if len(f.data) > 4 {
				pos += len(f.data) + len(f.data)&1
			}
		}
	}
	// Data: smallest overview first, full resolution last; each tile with
	// a 4-byte leader (its size) and a 4-byte trailer (its last 4 bytes).
	dataPos := uint64(pos)
	for k := len(levels) - 1; k >= 0; k-- {
		l := levels[k]
		for _, d := range l.data {
			dataPos += 4
			l.offsets = append(l.offsets, dataPos)
			l.sizes = append(l.sizes, uint64(len(d)))
			dataPos += uint64(len(d)) + 4
		}
	}
	if dataPos > math.MaxUint32 {
		return fmt.Errorf("terrain: geotiff: write: %d bytes is too large for a classic TIFF", dataPos)
	}
	bw := bufio.NewWriterSize(w, 1<<20)
	hdr := make([]byte, 8)
	copy(hdr, "II")
	order.PutUint16(hdr[2:], 42)
	order.PutUint32(hdr[4:], uint32(ifdPos[0]))
	bw.Write(hdr)
	bw.WriteString(ghost)
	if (8+len(ghost))&1 == 1 {
		bw.WriteByte(0)
	}
	for k := range levels {
		fs := all[k]
		for i := range fs {
			switch fs[i].tag {
			case tiffTagTileOffsets:
				fs[i].data = longs(levels[k].offsets...)
			case tiffTagTileByteCounts:
				fs[i].data = longs(levels[k].sizes...)
			}
		}
		size := 2 + 12*len(fs) + 4
		ifd := make([]byte, size)
		order.PutUint16(ifd, uint16(len(fs)))
		var values []byte
		for i, f := range fs {
			ent := ifd[2+12*i:]
			order.PutUint16(ent, uint16(f.tag))
			order.PutUint16(ent[2:], uint16(f.typ))
			order.PutUint32(ent[4:], uint32(f.count))
			if len(f.data) <= 4 {
				copy(ent[8:12], f.data)
			} else {
				order.PutUint32(ent[8:], uint32(ifdPos[k]+size+len(values)))
				values = append(values, f.data...)
				if len(f.data)&1 == 1 {
					values = append(values, 0)
				}
			}
		}
		if k+1 < len(levels) {
			order.PutUint32(ifd[size-4:], uint32(ifdPos[k+1]))
		}
		bw.Write(ifd)
		bw.Write(values)
	}
	var lead [4]byte
	for k := len(levels) - 1; k >= 0; k-- {
		for _, d := range levels[k].data {
			order.PutUint32(lead[:], uint32(len(d)))
			bw.Write(lead[:])
			bw.Write(d)
			if len(d) >= 4 {
				bw.Write(d[len(d)-4:])
			} else {
				var tr [4]byte
				copy(tr[4-len(d):], d)
				bw.Write(tr[:])
			}
		}
	}
	return bw.Flush()
}

// floatPredictor fills dst (4·n bytes) with the n float32 samples of row
// (byte order order) under the floating-point predictor 3 (Adobe Photoshop
// TIFF Technical Note 3): the bytes of each sample most significant first
// into four planes, then each byte differenced from the one before.
func floatPredictor(dst, row []byte, n int, order binary.ByteOrder) {
	for i := range n {
		bits := order.Uint32(row[4*i:])
		for k := range 4 {
			dst[k*n+i] = byte(bits >> (8 * (3 - k)))
		}
	}
	for i := len(dst) - 1; i > 0; i-- {
		dst[i] -= dst[i-1]
	}
}

// geoKeyDirectory returns the GeoKeyDirectoryTag (GeoTIFF 1.0, OGC
// 19-008r4 §7.1) of a raster in EPSG code epsg with RasterPixelIsArea:
// geographic with degrees for 4326, projected with metres otherwise.
func geoKeyDirectory(epsg int) []uint16 {
	keys := []uint16{1, 1, 0, 0}
	addKey := func(id, v uint16) { keys = append(keys, id, 0, 1, v); keys[3]++ }
	if epsg == 4326 {
		addKey(geoKeyModelType, geoModelTypeGeographic)
		addKey(geoKeyRasterType, geoRasterPixelIsArea)
		addKey(geoKeyGeographicType, 4326)
		addKey(2054, 9102) // GeogAngularUnitsGeoKey: degree
	} else {
		addKey(geoKeyModelType, geoModelTypeProjected)
		addKey(geoKeyRasterType, geoRasterPixelIsArea)
		addKey(geoKeyProjectedCSType, uint16(epsg))
		addKey(3076, 9001) // ProjLinearUnitsGeoKey: metre
	}
	return keys
}

// tiffShorts, tiffLongs and tiffDoubles encode TIFF field values (SHORT,
// LONG, DOUBLE; TIFF 6.0 §2) in byte order order.
func tiffShorts(order binary.ByteOrder) func(v ...uint16) []byte {
	return func(v ...uint16) []byte {
		b := make([]byte, 2*len(v))
		for i, x := range v {
			order.PutUint16(b[2*i:], x)
		}
		return b
	}
}

func tiffLongs(order binary.ByteOrder) func(v ...uint64) []byte {
	return func(v ...uint64) []byte {
		b := make([]byte, 4*len(v))
		for i, x := range v {
			order.PutUint32(b[4*i:], uint32(x))
		}
		return b
	}
}

func tiffDoubles(order binary.ByteOrder) func(v ...float64) []byte {
	return func(v ...float64) []byte {
		b := make([]byte, 8*len(v))
		for i, x := range v {
			order.PutUint64(b[8*i:], math.Float64bits(x))
		}
		return b
	}
}
