package terrain

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"math"
	"os"
	"sync"
	"testing"
)

// recordingReader is an io.ReaderAt that records the byte ranges read from
// it (safe for the parallel ReadAt calls of ReadGeoTIFFWindow).
type recordingReader struct {
	r      *bytes.Reader
	mu     sync.Mutex
	ranges [][2]int64 // [off, off+len)
}

func (rr *recordingReader) ReadAt(p []byte, off int64) (int, error) {
	rr.mu.Lock()
	rr.ranges = append(rr.ranges, [2]int64{off, off + int64(len(p))})
	rr.mu.Unlock()
	return rr.r.ReadAt(p, off)
}

func (rr *recordingReader) total() (n int64) {
	for _, r := range rr.ranges {
		n += r[1] - r[0]
	}
	return n
}

// TestGeoTIFFWindowReadsOnlyItsChunks checks on GDAL-made fixtures (made by
// testdata/geotiff/make.sh) that a window read fetches exactly the strips or
// tiles that hold the window's cells and no other sample bytes: the chunk
// layout is TIFF 6.0 §15 (tiles, row-major) and §3 (strips).
func TestGeoTIFFWindowReadsOnlyItsChunks(t *testing.T) {
	for _, tc := range []struct {
		name           string
		c0, r0, c1, r1 int   // cells whose centres bound the window
		chunks         []int // chunk indices that must be read, and no other
	}{
		// 64 × 32 tiles, 2 across, 3 down: cells 70..80 × 40..50 lie in
		// tile (1, 1) only.
		{"geo_int16_tiled_lzw_pred2.tif", 70, 40, 80, 50, []int{3}},
		// The same tiles, a window across the tile corner at (64, 32).
		{"geo_int16_tiled_lzw_pred2.tif", 60, 30, 66, 34, []int{0, 1, 2, 3}},
		// Strips of 7 rows: rows 20..30 are in strips 2, 3 and 4.
		{"geo_uint16_strip_deflate_pred2.tif", 5, 20, 100, 30, []int{2, 3, 4}},
	} {
		data := readGeoTIFFFixture(t, tc.name)
		info, err := ReadGeoTIFFInfo(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			t.Fatal(err)
		}
		rec := &recordingReader{r: bytes.NewReader(data)}
		x0, x1 := info.X0+float64(tc.c0)*info.DX, info.X0+float64(tc.c1)*info.DX
		y0, y1 := info.Y0-float64(tc.r1)*info.DY, info.Y0-float64(tc.r0)*info.DY
		g, err := ReadGeoTIFFWindow(rec, int64(len(data)), x0, y0, x1, y1)
		if err != nil {
			t.Fatal(err)
		}
		if g.Cols != tc.c1-tc.c0+1 || g.Rows != tc.r1-tc.r0+1 {
			t.Errorf("%s: window %d × %d, want %d × %d", tc.name, g.Cols, g.Rows, tc.c1-tc.c0+1, tc.r1-tc.r0+1)
		}
		want := map[int]bool{}
		for _, c := range tc.chunks {
			want[c] = true
		}
		read := map[int]bool{}
		var chunkBytes, needed int64
		for i := range info.offsets {
			lo, hi := int64(info.offsets[i]), int64(info.offsets[i]+info.counts[i])
			if want[i] {
				needed += hi - lo
			}
			for _, r := range rec.ranges {
				if r[0] < hi && r[1] > lo {
					read[i] = true
					chunkBytes += min(r[1], hi) - max(r[0], lo)
				}
			}
		}
		for i := range info.offsets {
			if read[i] != want[i] {
				t.Errorf("%s cells %d..%d × %d..%d: %s %d read = %v, want %v", tc.name, tc.c0, tc.c1, tc.r0, tc.r1,
					info.chunkWord(), i, read[i], want[i])
			}
		}
		// Each needed chunk is read once, whole.
		if chunkBytes != needed {
			t.Errorf("%s: %d bytes of sample data read, the needed %ss hold %d", tc.name, chunkBytes, info.chunkWord(), needed)
		}
	}
}

// TestHGTWindowReadsOnlyItsCells checks that a window of an SRTM tile reads
// only the rows it needs (SRTM layout: rows of n big-endian int16 samples,
// first row north; USGS SRTM documentation): a narrow window reads only its
// columns of each row, a wide one whole rows, never the rest of the tile.
func TestHGTWindowReadsOnlyItsCells(t *testing.T) {
	p := makeHGT(t, t.TempDir(), -1, -25, 1201)
	data, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	for _, box := range [][4]float64{
		{-24.9, -0.9, -24.89, -0.89},  // 15 × 15 cells
		{-25.5, -0.52, -23.5, -0.5},   // full width, 27 rows
		{-24.61, -0.31, -24.6, -0.29}, // 15 × 28 cells
	} {
		rec := &recordingReader{r: bytes.NewReader(data)}
		g, err := ReadHGTWindow(rec, int64(len(data)), p, box[0], box[1], box[2], box[3])
		if err != nil {
			t.Fatal(err)
		}
		// Narrow windows read 2 bytes per cell; wide ones whole rows.
		limit := int64(2 * g.Cols * g.Rows)
		if g.Cols > 1201/2 {
			limit = int64(2 * 1201 * g.Rows)
		}
		if got := rec.total(); got != limit {
			t.Errorf("box %v: %d × %d cells, read %d bytes, want %d (file %d bytes)", box, g.Cols, g.Rows, got, limit, len(data))
		}
		for _, r := range rec.ranges {
			if row0, row1 := r[0]/(2*1201), (r[1]-1)/(2*1201); row0 != row1 && g.Cols <= 1201/2 {
				t.Errorf("box %v: a narrow read spans rows %d..%d", box, row0, row1)
			}
		}
	}
}

// TestGeoTIFFBigEndianFloatPredictor reads big-endian files with the
// floating-point predictor, built by hand because GDAL 3.6.2 cannot make a
// correct one (see testdata/geotiff/make.sh). Adobe Photoshop TIFF Technical
// Note 3 (layout from memory, as in geotiff.go): each row's samples are
// split into byte lanes, most significant byte first whatever the file's
// byte order, and the lanes are then byte-differenced. GDAL 3.6.2 reads
// files laid out so: run once on a big-endian predictor-3 deflate file of
// geo_float32_tiled_deflate_pred3.tif's cells (made by GeoTIFFWriter), its
// gdallocationinfo printed 900 at cell (0, 0) and 1686.10302734375 at
// (64, 32). The expected cells are the little-endian GDAL fixtures' cells,
// themselves checked against gdallocationinfo in TestGeoTIFFMatchesGDAL.
func TestGeoTIFFBigEndianFloatPredictor(t *testing.T) {
	for _, tc := range []struct {
		fixture string
		bits    int
	}{
		{"geo_float32_tiled_deflate_pred3.tif", 32},
		{"geo_float64_tiled_lzw_pred3.tif", 64},
	} {
		le := readGeoTIFFFixture(t, tc.fixture)
		want, err := ReadGeoTIFFWindow(bytes.NewReader(le), int64(len(le)), -180, -90, 180, 90)
		if err != nil {
			t.Fatal(err)
		}
		bps := tc.bits / 8
		w, h, rps := want.Cols, want.Rows, 8
		var payload []byte
		var offsets, counts []uint64
		row := make([]byte, w*bps)
		lanes := make([]byte, w*bps)
		for s := 0; s < h; s += rps {
			var strip bytes.Buffer
			for r := s; r < min(s+rps, h); r++ {
				for c := range w {
					v := want.Elev[r*w+c]
					if tc.bits == 32 {
						binary.BigEndian.PutUint32(row[c*4:], math.Float32bits(v))
					} else {
						binary.BigEndian.PutUint64(row[c*8:], math.Float64bits(float64(v)))
					}
				}
				for c := range w {
					for k := range bps {
						lanes[k*w+c] = row[c*bps+k]
					}
				}
				for i := len(lanes) - 1; i > 0; i-- {
					lanes[i] -= lanes[i-1]
				}
				strip.Write(lanes)
			}
			var z bytes.Buffer
			zw := zlib.NewWriter(&z)
			zw.Write(strip.Bytes())
			zw.Close()
			offsets = append(offsets, uint64(8+len(payload)))
			counts = append(counts, uint64(z.Len()))
			payload = append(payload, z.Bytes()...)
		}
		fields := geotiffTestFields(uint64(w), uint64(h), stripFields(uint64(rps), offsets, counts, GeoTIFFDeflate)...)
		fields = replaceField(fields, tiffTestField{tag: tiffTagBitsPerSample, typ: tiffTypeShort, ints: []uint64{uint64(tc.bits)}})
		fields = replaceField(fields, tiffTestField{tag: tiffTagSampleFormat, typ: tiffTypeShort, ints: []uint64{3}})
		fields = append(fields, tiffTestField{tag: tiffTagPredictor, typ: tiffTypeShort, ints: []uint64{3}})
		be := buildTestTIFF(binary.BigEndian, fields, payload)
		got, err := readTestTIFF(be)
		if err != nil {
			t.Fatalf("%d-bit: %v", tc.bits, err)
		}
		for i := range want.Elev {
			if got.Elev[i] != want.Elev[i] {
				t.Fatalf("%d-bit big endian, cell %d: %g, want %g", tc.bits, i, got.Elev[i], want.Elev[i])
			}
		}
		// The two cells gdallocationinfo printed (see above).
		if got.Elev[0] != 900 || got.Elev[32*w+64] != float32(1686.10302734375) {
			t.Errorf("%d-bit big endian: cells (0, 0), (64, 32) = %g, %g, GDAL 900, 1686.10302734375", tc.bits, got.Elev[0], got.Elev[32*w+64])
		}
	}
}
