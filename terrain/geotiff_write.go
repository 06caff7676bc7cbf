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
					// Adobe Technical Note 3: bytes of each sample
					// most-significant first into planes, then differenced.
					wc := cw
					for i := range wc {
						bits := order.Uint32(row[4*i:])
						for k := range 4 {
							tmp[k*wc+i] = byte(bits >> (8 * (3 - k)))
						}
					}
					for i := len(tmp) - 1; i > 0; i-- {
						tmp[i] -= tmp[i-1]
					}
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
	shorts := func(v ...uint16) []byte {
		b := make([]byte, 2*len(v))
		for i, x := range v {
			order.PutUint16(b[2*i:], x)
		}
		return b
	}
	longs := func(v ...uint64) []byte {
		b := make([]byte, 4*len(v))
		for i, x := range v {
			order.PutUint32(b[4*i:], uint32(x))
		}
		return b
	}
	doubles := func(v ...float64) []byte {
		b := make([]byte, 8*len(v))
		for i, x := range v {
			order.PutUint64(b[8*i:], math.Float64bits(x))
		}
		return b
	}
	compression := uint16(GeoTIFFDeflate)
	if o.Uncompressed {
		compression = GeoTIFFNoCompression
	}
	keys := []uint16{1, 1, 0, 0}
	addKey := func(id, v uint16) { keys = append(keys, id, 0, 1, v); keys[3]++ }
	if geographic {
		addKey(geoKeyModelType, geoModelTypeGeographic)
		addKey(geoKeyRasterType, geoRasterPixelIsArea)
		addKey(geoKeyGeographicType, 4326)
		addKey(2054, 9102) // GeogAngularUnitsGeoKey: degree
	} else {
		addKey(geoKeyModelType, geoModelTypeProjected)
		addKey(geoKeyRasterType, geoRasterPixelIsArea)
		addKey(geoKeyProjectedCSType, uint16(e))
		addKey(3076, 9001) // ProjLinearUnitsGeoKey: metre
	}
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
