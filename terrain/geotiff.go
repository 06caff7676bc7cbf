package terrain

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// GeoTIFF reader: TIFF 6.0 (Adobe, 1992) with the OGC GeoTIFF 1.1 keys
// (OGC 19-008r4), and BigTIFF. Only the first image (IFD) of a file is read;
// overviews and masks that follow it are ignored.
//
// References:
//   - TIFF Revision 6.0, Adobe Developers Association, 1992: header, IFD,
//     strips and tiles, compression 1/5/32773, predictor 2.
//   - Adobe Photoshop TIFF Technical Notes (deflate, codes 8 and 32946) and
//     Technical Note 3 (floating-point predictor 3); titles and the byte
//     layout of predictor 3 from memory, confirmed by the GDAL-made
//     fixtures in testdata/geotiff (little and big endian, strips and tiles).
//   - BigTIFF (header version 43, 8-byte offsets, 20-byte IFD entries),
//     from memory; confirmed by a GDAL-made BIGTIFF=YES fixture.
//   - OGC GeoTIFF Standard 1.1 (OGC 19-008r4): ModelPixelScale 33550,
//     ModelTiepoint 33922, ModelTransformation 34264, GeoKeyDirectory 34735,
//     GTRasterTypeGeoKey 1025, GeographicTypeGeoKey 2048,
//     ProjectedCSTypeGeoKey 3072.
//   - GDAL private tag GDAL_NODATA 42113 (ASCII text of the no-data value).

// Limits that keep a hostile file from exhausting memory, checked before
// anything is allocated. A window read is also capped at MaxCells cells,
// the package-wide limit.
const (
	// GeoTIFFMaxChunkBytes caps the decoded size of one strip or tile.
	GeoTIFFMaxChunkBytes = 256 << 20
	geotiffMaxEntries    = 4096 // tags in one IFD
)

// GeoTIFFFormatError reports a file that is not a well-formed TIFF/GeoTIFF:
// truncated, inconsistent, or hostile (sizes past the end of the file, data
// that decodes beyond its declared size).
type GeoTIFFFormatError struct {
	Msg string
}

func (e *GeoTIFFFormatError) Error() string { return "terrain: geotiff: invalid file: " + e.Msg }

// GeoTIFFUnsupportedError reports a well-formed file that uses a tag value
// this reader does not handle. Tag names the TIFF tag or GeoKey with its
// code, e.g. "Compression (259)"; Value is the value found.
type GeoTIFFUnsupportedError struct {
	Tag   string
	Value string
	Why   string // optional explanation
}

func (e *GeoTIFFUnsupportedError) Error() string {
	s := "terrain: geotiff: unsupported " + e.Tag + " " + e.Value
	if e.Why != "" {
		s += ": " + e.Why
	}
	return s
}

func geotiffFormatf(format string, a ...any) error {
	return &GeoTIFFFormatError{Msg: fmt.Sprintf(format, a...)}
}

// SampleKind is the numeric type of a raster's samples.
type SampleKind int

// Sample kinds a GeoTIFF may hold (TIFF SampleFormat 339 with BitsPerSample 258).
const (
	SampleInt16 SampleKind = iota + 1
	SampleUint16
	SampleInt32
	SampleFloat32
	SampleFloat64
)

func (k SampleKind) String() string {
	switch k {
	case SampleInt16:
		return "int16"
	case SampleUint16:
		return "uint16"
	case SampleInt32:
		return "int32"
	case SampleFloat32:
		return "float32"
	case SampleFloat64:
		return "float64"
	}
	return "SampleKind(" + strconv.Itoa(int(k)) + ")"
}

// Size returns the bytes of one sample.
func (k SampleKind) Size() int {
	switch k {
	case SampleInt16, SampleUint16:
		return 2
	case SampleInt32, SampleFloat32:
		return 4
	case SampleFloat64:
		return 8
	}
	return 0
}

// TIFF compression codes (TIFF 6.0 §3, Technical Note 3 for deflate).
const (
	GeoTIFFNoCompression = 1
	GeoTIFFLZW           = 5
	GeoTIFFDeflate       = 8     // "Adobe deflate"
	GeoTIFFDeflateOld    = 32946 // older deflate code, same zlib stream
	GeoTIFFPackBits      = 32773
)

// GeoTIFFInfo is what the header of a GeoTIFF says, read without touching
// the samples. The georeference is given in the Grid convention: X0, Y0 is
// the centre of the north-west cell (0, 0), cell (c, r) has its centre at
// X0 + c·DX, Y0 − r·DY, in the CRS's units (degrees for EPSG 4326, metres
// for UTM), whatever the file's raster type: a RasterPixelIsPoint file's
// tiepoint is already a cell centre, a RasterPixelIsArea file's tiepoint is
// a cell corner and is moved by half a cell (GeoTIFF 1.1 §B.3, the same
// reading as GDAL's default).
type GeoTIFFInfo struct {
	Width, Height int // cells (columns, rows)
	BigTIFF       bool
	BigEndian     bool       // byte order "MM"
	Sample        SampleKind // type of band 1
	Bands         int        // SamplesPerPixel; only band 1 is read
	Compression   int        // TIFF code: 1, 5, 8, 32946, 32773
	Predictor     int        // 1 none, 2 horizontal, 3 floating point
	Tiled         bool
	// ChunkWidth × ChunkHeight is the size of one tile, or for strips the
	// image width × RowsPerStrip.
	ChunkWidth, ChunkHeight int

	CRS          CRS
	PixelIsPoint bool    // GTRasterTypeGeoKey 1025 = 2 (RasterPixelIsPoint)
	X0, Y0       float64 // centre of cell (0, 0), the north-west cell
	DX, DY       float64 // cell size, both positive

	HasNoData bool
	NoData    float64 // GDAL_NODATA; cells equal to it read as NaN

	order   binary.ByteOrder
	planar  int
	offsets []uint64 // strips or tiles of band 1, in file order
	counts  []uint64
	size    int64 // file size
}

// Extent returns the outer edges of the raster's cells (west, south, east,
// north), in the CRS's units: what gdalinfo prints as the corner
// coordinates.
func (info *GeoTIFFInfo) Extent() (west, south, east, north float64) {
	west = info.X0 - info.DX/2
	north = info.Y0 + info.DY/2
	east = west + float64(info.Width)*info.DX
	south = north - float64(info.Height)*info.DY
	return west, south, east, north
}

// TIFF tag codes used here (TIFF 6.0; GeoTIFF 1.1; GDAL).
const (
	tiffTagWidth            = 256
	tiffTagHeight           = 257
	tiffTagBitsPerSample    = 258
	tiffTagCompression      = 259
	tiffTagFillOrder        = 266
	tiffTagStripOffsets     = 273
	tiffTagSamplesPerPixel  = 277
	tiffTagRowsPerStrip     = 278
	tiffTagStripByteCounts  = 279
	tiffTagPlanarConfig     = 284
	tiffTagPredictor        = 317
	tiffTagTileWidth        = 322
	tiffTagTileLength       = 323
	tiffTagTileOffsets      = 324
	tiffTagTileByteCounts   = 325
	tiffTagSampleFormat     = 339
	tiffTagPixelScale       = 33550
	tiffTagTiepoint         = 33922
	tiffTagTransformation   = 34264
	tiffTagGeoKeyDirectory  = 34735
	tiffTagGeoDoubleParams  = 34736
	tiffTagGeoASCIIParams   = 34737
	tiffTagGDALNoData       = 42113
	geoKeyModelType         = 1024
	geoKeyRasterType        = 1025
	geoKeyGeographicType    = 2048
	geoKeyProjectedCSType   = 3072
	geoRasterPixelIsArea    = 1
	geoRasterPixelIsPoint   = 2
	geoModelTypeProjected   = 1
	geoModelTypeGeographic  = 2
	geoModelTypeGeocentric  = 3
	geoKeyUserDefined       = 32767
	tiffTypeByte            = 1
	tiffTypeASCII           = 2
	tiffTypeShort           = 3
	tiffTypeLong            = 4
	tiffTypeRational        = 5
	tiffTypeSByte           = 6
	tiffTypeUndefined       = 7
	tiffTypeSShort          = 8
	tiffTypeSLong           = 9
	tiffTypeSRational       = 10
	tiffTypeFloat           = 11
	tiffTypeDouble          = 12
	tiffTypeIFD             = 13
	tiffTypeLong8           = 16
	tiffTypeSLong8          = 17
	tiffTypeIFD8            = 18
	tiffMaxWidthOrHeight    = 1<<31 - 1
	tiffDefaultRowsPerStrip = 1<<32 - 1
)

var tiffTagNames = map[int]string{
	tiffTagWidth: "ImageWidth", tiffTagHeight: "ImageLength", tiffTagBitsPerSample: "BitsPerSample",
	tiffTagCompression: "Compression", tiffTagFillOrder: "FillOrder", tiffTagStripOffsets: "StripOffsets",
	tiffTagSamplesPerPixel: "SamplesPerPixel", tiffTagRowsPerStrip: "RowsPerStrip",
	tiffTagStripByteCounts: "StripByteCounts", tiffTagPlanarConfig: "PlanarConfiguration",
	tiffTagPredictor: "Predictor", tiffTagTileWidth: "TileWidth", tiffTagTileLength: "TileLength",
	tiffTagTileOffsets: "TileOffsets", tiffTagTileByteCounts: "TileByteCounts",
	tiffTagSampleFormat: "SampleFormat", tiffTagPixelScale: "ModelPixelScale",
	tiffTagTiepoint: "ModelTiepoint", tiffTagTransformation: "ModelTransformation",
	tiffTagGeoKeyDirectory: "GeoKeyDirectory", tiffTagGeoDoubleParams: "GeoDoubleParams",
	tiffTagGeoASCIIParams: "GeoAsciiParams", tiffTagGDALNoData: "GDAL_NODATA",
	geoKeyModelType: "GTModelTypeGeoKey", geoKeyRasterType: "GTRasterTypeGeoKey",
	geoKeyGeographicType: "GeographicTypeGeoKey", geoKeyProjectedCSType: "ProjectedCSTypeGeoKey",
}

// tiffTagName gives "Name (code)" for messages.
func tiffTagName(tag int) string {
	if n, ok := tiffTagNames[tag]; ok {
		return n + " (" + strconv.Itoa(tag) + ")"
	}
	return "tag " + strconv.Itoa(tag)
}

// tiffTypeSize is the bytes of one value of a TIFF field type; 0 if unknown.
func tiffTypeSize(typ int) int {
	switch typ {
	case tiffTypeByte, tiffTypeASCII, tiffTypeSByte, tiffTypeUndefined:
		return 1
	case tiffTypeShort, tiffTypeSShort:
		return 2
	case tiffTypeLong, tiffTypeSLong, tiffTypeFloat, tiffTypeIFD:
		return 4
	case tiffTypeRational, tiffTypeSRational, tiffTypeDouble, tiffTypeLong8, tiffTypeSLong8, tiffTypeIFD8:
		return 8
	}
	return 0
}

// tiffEntry is one IFD entry with its raw value bytes (inline or fetched).
type tiffEntry struct {
	tag, typ int
	count    uint64
	data     []byte
}

// tiffReader reads the fields of one IFD.
type tiffReader struct {
	r       io.ReaderAt
	size    int64
	order   binary.ByteOrder
	big     bool
	entries map[int]*tiffEntry
}

// readAt reads n bytes at off, refusing ranges outside the file before
// allocating.
func (t *tiffReader) readAt(off, n uint64, what string) ([]byte, error) {
	if off > uint64(t.size) || n > uint64(t.size)-off {
		return nil, geotiffFormatf("%s at offset %d, %d bytes, runs past the end of the file (%d bytes)", what, off, n, t.size)
	}
	b := make([]byte, n)
	// io.ReaderAt may return io.EOF with a full read at the end of the file.
	if m, err := t.r.ReadAt(b, int64(off)); m < len(b) {
		if err == nil || err == io.EOF {
			return nil, geotiffFormatf("%s at offset %d is truncated: %d of %d bytes", what, off, m, n)
		}
		return nil, fmt.Errorf("terrain: geotiff: reading %s: %w", what, err)
	}
	return b, nil
}

func (t *tiffReader) readIFD(off uint64) error {
	head, entrySize, valSize := uint64(2), uint64(12), uint64(4)
	if t.big {
		head, entrySize, valSize = 8, 20, 8
	}
	b, err := t.readAt(off, head, "IFD")
	if err != nil {
		return err
	}
	var n uint64
	if t.big {
		n = t.order.Uint64(b)
	} else {
		n = uint64(t.order.Uint16(b))
	}
	if n == 0 || n > geotiffMaxEntries {
		return geotiffFormatf("IFD at offset %d has %d entries (want 1..%d)", off, n, geotiffMaxEntries)
	}
	b, err = t.readAt(off+head, n*entrySize, "IFD entries")
	if err != nil {
		return err
	}
	t.entries = make(map[int]*tiffEntry, n)
	for i := uint64(0); i < n; i++ {
		e := b[i*entrySize : (i+1)*entrySize]
		tag, typ := int(t.order.Uint16(e)), int(t.order.Uint16(e[2:]))
		var count uint64
		var val []byte
		if t.big {
			count, val = t.order.Uint64(e[4:]), e[12:20]
		} else {
			count, val = uint64(t.order.Uint32(e[4:])), e[8:12]
		}
		ts := tiffTypeSize(typ)
		if ts == 0 {
			continue // unknown field type: TIFF 6.0 says readers skip it
		}
		if count > uint64(t.size) {
			return geotiffFormatf("%s has %d values, more than the file has bytes", tiffTagName(tag), count)
		}
		nb := count * uint64(ts)
		var data []byte
		if nb <= valSize {
			data = val[:nb]
		} else {
			var voff uint64
			if t.big {
				voff = t.order.Uint64(val)
			} else {
				voff = uint64(t.order.Uint32(val))
			}
			if !geotiffTagWanted(tag) {
				continue // skip (and never fetch) tags this reader does not use
			}
			data, err = t.readAt(voff, nb, tiffTagName(tag))
			if err != nil {
				return err
			}
		}
		t.entries[tag] = &tiffEntry{tag: tag, typ: typ, count: count, data: data}
	}
	return nil
}

func geotiffTagWanted(tag int) bool {
	_, ok := tiffTagNames[tag]
	return ok
}

// uints returns an integer field's values.
func (t *tiffReader) uints(tag int) ([]uint64, bool, error) {
	e, ok := t.entries[tag]
	if !ok {
		return nil, false, nil
	}
	out := make([]uint64, e.count)
	ts := tiffTypeSize(e.typ)
	for i := range out {
		d := e.data[i*ts:]
		switch e.typ {
		case tiffTypeByte:
			out[i] = uint64(d[0])
		case tiffTypeShort:
			out[i] = uint64(t.order.Uint16(d))
		case tiffTypeLong, tiffTypeIFD:
			out[i] = uint64(t.order.Uint32(d))
		case tiffTypeLong8, tiffTypeIFD8:
			out[i] = t.order.Uint64(d)
		default:
			return nil, true, geotiffFormatf("%s has field type %d, want an unsigned integer type", tiffTagName(tag), e.typ)
		}
	}
	return out, true, nil
}

// uint1 returns a single-valued integer field, def when absent. Fields that
// repeat one value per sample (BitsPerSample, SampleFormat) must agree.
func (t *tiffReader) uint1(tag int, def uint64) (uint64, error) {
	v, ok, err := t.uints(tag)
	if err != nil || !ok {
		return def, err
	}
	if len(v) == 0 {
		return 0, geotiffFormatf("%s has no value", tiffTagName(tag))
	}
	return v[0], nil
}

func (t *tiffReader) floats(tag int) ([]float64, bool, error) {
	e, ok := t.entries[tag]
	if !ok {
		return nil, false, nil
	}
	if e.typ != tiffTypeDouble {
		return nil, true, geotiffFormatf("%s has field type %d, want DOUBLE (12)", tiffTagName(tag), e.typ)
	}
	out := make([]float64, e.count)
	for i := range out {
		out[i] = math.Float64frombits(t.order.Uint64(e.data[i*8:]))
	}
	return out, true, nil
}

// ReadGeoTIFFInfo reads the header of a GeoTIFF of size bytes: dimensions,
// sample type, compression, layout, georeference, CRS and no-data value.
// It reads the first IFD and the tags it needs, and checks that every strip
// or tile lies inside the file; it reads no samples. Errors are
// *GeoTIFFFormatError for a malformed file and *GeoTIFFUnsupportedError
// for a feature outside what this reader handles (the message names the
// tag and value).
func ReadGeoTIFFInfo(r io.ReaderAt, size int64) (*GeoTIFFInfo, error) {
	if size < 8 {
		return nil, geotiffFormatf("file of %d bytes is too short for a TIFF header", size)
	}
	t := &tiffReader{r: r, size: size}
	hdr, err := t.readAt(0, 8, "header")
	if err != nil {
		return nil, err
	}
	switch string(hdr[:2]) {
	case "II":
		t.order = binary.LittleEndian
	case "MM":
		t.order = binary.BigEndian
	default:
		return nil, geotiffFormatf("not a TIFF: first bytes %q, want \"II\" or \"MM\"", hdr[:2])
	}
	var ifd uint64
	switch magic := t.order.Uint16(hdr[2:]); magic {
	case 42:
		ifd = uint64(t.order.Uint32(hdr[4:]))
	case 43:
		t.big = true
		b, err := t.readAt(0, 16, "BigTIFF header")
		if err != nil {
			return nil, err
		}
		if t.order.Uint16(b[4:]) != 8 || t.order.Uint16(b[6:]) != 0 {
			return nil, geotiffFormatf("BigTIFF header: offset size %d, want 8", t.order.Uint16(b[4:]))
		}
		ifd = t.order.Uint64(b[8:])
	default:
		return nil, geotiffFormatf("not a TIFF: version %d, want 42 (TIFF) or 43 (BigTIFF)", magic)
	}
	if err := t.readIFD(ifd); err != nil {
		return nil, err
	}
	info := &GeoTIFFInfo{BigTIFF: t.big, BigEndian: t.order == binary.BigEndian, order: t.order, size: size}
	if err := info.parseLayout(t); err != nil {
		return nil, err
	}
	if err := info.parseGeo(t); err != nil {
		return nil, err
	}
	return info, nil
}

func geotiffUnsupported(tag int, value any, why string) error {
	return &GeoTIFFUnsupportedError{Tag: tiffTagName(tag), Value: fmt.Sprint(value), Why: why}
}

// parseLayout reads dimensions, sample type, compression and the strip or
// tile arrays.
func (info *GeoTIFFInfo) parseLayout(t *tiffReader) error {
	w, okW, err := t.uints(tiffTagWidth)
	if err != nil {
		return err
	}
	h, okH, err := t.uints(tiffTagHeight)
	if err != nil {
		return err
	}
	if !okW || !okH || len(w) == 0 || len(h) == 0 {
		return geotiffFormatf("ImageWidth (256) or ImageLength (257) missing")
	}
	if w[0] == 0 || h[0] == 0 || w[0] > tiffMaxWidthOrHeight || h[0] > tiffMaxWidthOrHeight {
		return geotiffFormatf("image of %d × %d cells (each side must be 1..%d)", w[0], h[0], tiffMaxWidthOrHeight)
	}
	info.Width, info.Height = int(w[0]), int(h[0])

	spp, err := t.uint1(tiffTagSamplesPerPixel, 1)
	if err != nil {
		return err
	}
	if spp == 0 || spp > 1024 {
		return geotiffFormatf("SamplesPerPixel (277) is %d", spp)
	}
	info.Bands = int(spp)
	planar, err := t.uint1(tiffTagPlanarConfig, 1)
	if err != nil {
		return err
	}
	if planar != 1 && planar != 2 {
		return geotiffUnsupported(tiffTagPlanarConfig, planar, "want 1 (chunky) or 2 (planar)")
	}
	if spp > 1 && planar == 1 {
		return geotiffUnsupported(tiffTagSamplesPerPixel, spp, "several bands interleaved (PlanarConfiguration 1); a DEM has one band")
	}
	info.planar = int(planar)

	bps, err := t.uint1(tiffTagBitsPerSample, 1)
	if err != nil {
		return err
	}
	sf, err := t.uint1(tiffTagSampleFormat, 1)
	if err != nil {
		return err
	}
	switch {
	case sf == 2 && bps == 16:
		info.Sample = SampleInt16
	case sf == 1 && bps == 16:
		info.Sample = SampleUint16
	case sf == 2 && bps == 32:
		info.Sample = SampleInt32
	case sf == 3 && bps == 32:
		info.Sample = SampleFloat32
	case sf == 3 && bps == 64:
		info.Sample = SampleFloat64
	default:
		return geotiffUnsupported(tiffTagSampleFormat, fmt.Sprintf("%d with BitsPerSample (258) %d", sf, bps),
			"want int16, uint16, int32, float32 or float64")
	}

	c, err := t.uint1(tiffTagCompression, 1)
	if err != nil {
		return err
	}
	switch c {
	case GeoTIFFNoCompression, GeoTIFFLZW, GeoTIFFDeflate, GeoTIFFDeflateOld, GeoTIFFPackBits:
	default:
		return geotiffUnsupported(tiffTagCompression, c, "want 1 (none), 5 (LZW), 8 or 32946 (deflate), 32773 (PackBits)")
	}
	info.Compression = int(c)
	fo, err := t.uint1(tiffTagFillOrder, 1)
	if err != nil {
		return err
	}
	if fo != 1 {
		return geotiffUnsupported(tiffTagFillOrder, fo, "want 1")
	}
	p, err := t.uint1(tiffTagPredictor, 1)
	if err != nil {
		return err
	}
	// Predictor 2 on float samples differences their bit patterns as
	// unsigned integers of the sample's width (what libtiff does and GDAL
	// writes for PREDICTOR=2 on Float32/Float64).
	switch {
	case p == 1, p == 2:
	case p == 3 && (info.Sample == SampleFloat32 || info.Sample == SampleFloat64):
	default:
		return geotiffUnsupported(tiffTagPredictor, fmt.Sprintf("%d with %s samples", p, info.Sample),
			"want 1 (none), 2 (horizontal), or 3 (floating point) for float samples")
	}
	info.Predictor = int(p)

	// Strips or tiles.
	offTag, cntTag := tiffTagStripOffsets, tiffTagStripByteCounts
	if _, ok := t.entries[tiffTagTileWidth]; ok {
		info.Tiled = true
		offTag, cntTag = tiffTagTileOffsets, tiffTagTileByteCounts
		tw, err := t.uint1(tiffTagTileWidth, 0)
		if err != nil {
			return err
		}
		th, err := t.uint1(tiffTagTileLength, 0)
		if err != nil {
			return err
		}
		if tw == 0 || th == 0 || tw > 1<<16 || th > 1<<16 {
			return geotiffFormatf("tiles of %d × %d cells (each side must be 1..65536)", tw, th)
		}
		info.ChunkWidth, info.ChunkHeight = int(tw), int(th)
	} else {
		rps, err := t.uint1(tiffTagRowsPerStrip, tiffDefaultRowsPerStrip)
		if err != nil {
			return err
		}
		if rps == 0 {
			return geotiffFormatf("RowsPerStrip (278) is 0")
		}
		info.ChunkWidth, info.ChunkHeight = info.Width, int(min(rps, uint64(info.Height)))
	}
	if cb := uint64(info.ChunkWidth) * uint64(info.ChunkHeight) * uint64(info.Sample.Size()); cb > GeoTIFFMaxChunkBytes {
		return geotiffFormatf("one %s of %d × %d %s cells is %d bytes, over the limit of %d", info.chunkWord(),
			info.ChunkWidth, info.ChunkHeight, info.Sample, cb, GeoTIFFMaxChunkBytes)
	}
	across, down := info.chunksAcross(), info.chunksDown()
	want := uint64(across) * uint64(down)
	total := want * uint64(info.planes())
	offs, ok, err := t.uints(offTag)
	if err != nil {
		return err
	}
	if !ok {
		return geotiffFormatf("%s missing", tiffTagName(offTag))
	}
	cnts, ok, err := t.uints(cntTag)
	if err != nil {
		return err
	}
	if !ok {
		return geotiffFormatf("%s missing", tiffTagName(cntTag))
	}
	if uint64(len(offs)) != total || uint64(len(cnts)) != total {
		return geotiffFormatf("%s has %d and %s %d values, want %d for %d × %d cells in %d × %d %ss",
			tiffTagName(offTag), len(offs), tiffTagName(cntTag), len(cnts), total,
			info.Width, info.Height, info.ChunkWidth, info.ChunkHeight, info.chunkWord())
	}
	offs, cnts = offs[:want], cnts[:want] // band 1 comes first when planar
	for i := range offs {
		if cnts[i] == 0 && offs[i] == 0 {
			continue // sparse chunk (GDAL SPARSE_OK): read as no data
		}
		if offs[i] > uint64(info.size) || cnts[i] > uint64(info.size)-offs[i] {
			return geotiffFormatf("%s %d at offset %d, %d bytes, runs past the end of the file (%d bytes)",
				info.chunkWord(), i, offs[i], cnts[i], info.size)
		}
	}
	info.offsets, info.counts = offs, cnts
	return nil
}

// planes is the number of sample planes stored one after the other.
func (info *GeoTIFFInfo) planes() int {
	if info.planar == 2 {
		return info.Bands
	}
	return 1
}

func (info *GeoTIFFInfo) chunkWord() string {
	if info.Tiled {
		return "tile"
	}
	return "strip"
}

func (info *GeoTIFFInfo) chunksAcross() int {
	return (info.Width + info.ChunkWidth - 1) / info.ChunkWidth
}

func (info *GeoTIFFInfo) chunksDown() int {
	return (info.Height + info.ChunkHeight - 1) / info.ChunkHeight
}

// parseGeo reads the georeference, the CRS and the no-data value.
func (info *GeoTIFFInfo) parseGeo(t *tiffReader) error {
	// GeoKeys first: the raster type decides how the tiepoint is read.
	dir, ok, err := t.uints(tiffTagGeoKeyDirectory)
	if err != nil {
		return err
	}
	if !ok {
		return geotiffFormatf("GeoKeyDirectory (34735) missing: a plain TIFF without a coordinate system")
	}
	if len(dir) < 4 {
		return geotiffFormatf("GeoKeyDirectory (34735) has %d values, want at least 4", len(dir))
	}
	if dir[0] != 1 {
		return geotiffUnsupported(tiffTagGeoKeyDirectory, fmt.Sprintf("version %d", dir[0]), "want 1")
	}
	nkeys := dir[3]
	if uint64(len(dir)) < 4+4*nkeys {
		return geotiffFormatf("GeoKeyDirectory (34735) declares %d keys in %d values", nkeys, len(dir))
	}
	keys := map[int]uint64{}
	for k := uint64(0); k < nkeys; k++ {
		e := dir[4+4*k : 8+4*k]
		if e[1] == 0 && e[2] == 1 { // SHORT value held in the entry itself
			keys[int(e[0])] = e[3]
		}
	}
	raster, hasRaster := keys[geoKeyRasterType]
	switch {
	case !hasRaster || raster == geoRasterPixelIsArea:
	case raster == geoRasterPixelIsPoint:
		info.PixelIsPoint = true
	default:
		return geotiffUnsupported(geoKeyRasterType, raster, "want 1 (PixelIsArea) or 2 (PixelIsPoint)")
	}
	model := keys[geoKeyModelType]
	if model == geoModelTypeGeocentric {
		return geotiffUnsupported(geoKeyModelType, model, "geocentric model")
	}
	if pcs, ok := keys[geoKeyProjectedCSType]; ok && model != geoModelTypeGeographic {
		switch {
		case pcs >= 32601 && pcs <= 32660, pcs >= 32701 && pcs <= 32760:
		// EPSG 25828..25838: ETRS89 / UTM zones 28N..38N (range from memory).
		case pcs >= 25828 && pcs <= 25838:
		case pcs == geoKeyUserDefined:
			return geotiffUnsupported(geoKeyProjectedCSType, pcs, "user-defined projection; want an EPSG code 326zz, 327zz or 258zz")
		default:
			return geotiffUnsupported(geoKeyProjectedCSType, pcs, "want EPSG 326zz/327zz (WGS84 UTM) or 258zz (ETRS89 UTM)")
		}
		info.CRS = CRS{EPSG: int(pcs)}
	} else if model == geoModelTypeProjected {
		return geotiffFormatf("projected model without ProjectedCSTypeGeoKey (3072)")
	} else if gcs, ok := keys[geoKeyGeographicType]; ok {
		if gcs != 4326 {
			return geotiffUnsupported(geoKeyGeographicType, gcs, "want 4326 (WGS84)")
		}
		info.CRS = CRS{EPSG: 4326}
	} else {
		return geotiffFormatf("no GeographicTypeGeoKey (2048) or ProjectedCSTypeGeoKey (3072): unknown coordinate system")
	}

	// Raster-to-model transform: X = a·I + d, Y = f·J + h in raster space,
	// where (I, J) = (c+½, r+½) is the centre of cell (c, r) for PixelIsArea
	// and (c, r) for PixelIsPoint.
	var a, d, f, h float64
	tr, hasTr, err := t.floats(tiffTagTransformation)
	if err != nil {
		return err
	}
	tp, hasTp, err := t.floats(tiffTagTiepoint)
	if err != nil {
		return err
	}
	sc, hasSc, err := t.floats(tiffTagPixelScale)
	if err != nil {
		return err
	}
	switch {
	case hasTr:
		if len(tr) != 16 {
			return geotiffFormatf("ModelTransformation (34264) has %d values, want 16", len(tr))
		}
		if tr[1] != 0 || tr[4] != 0 {
			return geotiffUnsupported(tiffTagTransformation, fmt.Sprintf("with rotation terms %g, %g", tr[1], tr[4]),
				"rotated or sheared rasters are not supported; warp it north-up first (e.g. gdalwarp)")
		}
		a, d, f, h = tr[0], tr[3], tr[5], tr[7]
	case hasTp && hasSc:
		if len(tp) < 6 || len(sc) < 2 {
			return geotiffFormatf("ModelTiepoint (33922) has %d values and ModelPixelScale (33550) %d, want ≥ 6 and ≥ 2", len(tp), len(sc))
		}
		if len(tp) > 6 {
			return geotiffUnsupported(tiffTagTiepoint, fmt.Sprintf("with %d tiepoints", len(tp)/6), "ground control points; want one tiepoint and a pixel scale")
		}
		a, f = sc[0], -sc[1]
		d, h = tp[3]-tp[0]*a, tp[4]-tp[1]*f
	case hasTp:
		return geotiffUnsupported(tiffTagTiepoint, "without ModelPixelScale (33550)", "ground control points are not supported")
	default:
		return geotiffFormatf("no ModelTiepoint (33922) + ModelPixelScale (33550) or ModelTransformation (34264): the raster has no georeference")
	}
	for _, v := range []float64{a, d, f, h} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return geotiffFormatf("georeference holds a non-finite number")
		}
	}
	if !(a > 0) || !(f < 0) {
		return geotiffUnsupported(tiffTagPixelScale, fmt.Sprintf("cell size %g × %g", a, -f), "want a north-up raster with positive cell sizes")
	}
	off := 0.5
	if info.PixelIsPoint {
		off = 0
	}
	info.DX, info.DY = a, -f
	info.X0, info.Y0 = d+off*a, h+off*f

	if e, ok := t.entries[tiffTagGDALNoData]; ok && e.typ == tiffTypeASCII {
		s := strings.TrimSpace(strings.TrimRight(string(e.data), "\x00"))
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return geotiffFormatf("GDAL_NODATA (42113) is %q, not a number", s)
		}
		info.HasNoData, info.NoData = true, v
	}
	return nil
}
