package terrain

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"golang.org/x/image/tiff/lzw"
)

// ReadGeoTIFFWindow reads the part of a GeoTIFF (of size bytes) that covers
// the window west..east, south..north, given in the raster's CRS units
// (degrees lon/lat for EPSG 4326, metres for UTM). Only the strips or tiles
// that hold the window are read and decoded.
//
// The Grid returned is the smallest block of cells whose centres enclose
// the window, clipped to the raster: bilinear sampling is possible at every
// point of the window that lies between the raster's outermost cell centres.
// A window of the whole Extent reads the whole raster. Samples equal to the
// GDAL_NODATA value (and NaN samples) read as NaN. Integer samples become
// float32 exactly (int32 up to ±2²⁴, far beyond any elevation in metres).
// The Grid's Name is left empty for the caller. Chunks are decoded in
// parallel, so r must allow parallel ReadAt calls, as the io.ReaderAt
// contract requires (*os.File and *bytes.Reader do).
//
// Errors: a window that misses the raster (wrapping ErrOutside) or holds more than MaxCells
// cells, and every error of ReadGeoTIFFInfo; a strip or tile that is
// truncated or decodes to more than its declared size is a
// *GeoTIFFFormatError.
func ReadGeoTIFFWindow(r io.ReaderAt, size int64, west, south, east, north float64) (*Grid, error) {
	info, err := ReadGeoTIFFInfo(r, size)
	if err != nil {
		return nil, err
	}
	return info.readWindow(r, west, south, east, north)
}

// cellWindow returns the inclusive cell range (c0..c1, r0..r1) whose centres
// enclose the window, clipped to the raster.
func (info *GeoTIFFInfo) cellWindow(west, south, east, north float64) (c0, r0, c1, r1 int, err error) {
	for _, v := range []float64{west, south, east, north} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, 0, 0, 0, fmt.Errorf("terrain: geotiff: window %g, %g, %g, %g is not finite", west, south, east, north)
		}
	}
	if west > east || south > north {
		return 0, 0, 0, 0, fmt.Errorf("terrain: geotiff: window west %g > east %g or south %g > north %g", west, east, south, north)
	}
	w, s, e, n := info.Extent()
	if west > e || east < w || south > n || north < s {
		return 0, 0, 0, 0, fmt.Errorf("%w: geotiff window %g..%g, %g..%g misses the raster extent %g..%g, %g..%g",
			ErrOutside, west, east, south, north, w, e, s, n)
	}
	clamp := func(v float64, hi int) int {
		if !(v >= 0) {
			return 0
		}
		if v > float64(hi) {
			return hi
		}
		return int(v)
	}
	// A bound within 1e-9 cells of a cell centre counts as on it, so that
	// rounding in the caller's arithmetic does not add a row or column.
	const eps = 1e-9
	c0 = clamp(math.Floor((west-info.X0)/info.DX+eps), info.Width-1)
	c1 = clamp(math.Ceil((east-info.X0)/info.DX-eps), info.Width-1)
	r0 = clamp(math.Floor((info.Y0-north)/info.DY+eps), info.Height-1)
	r1 = clamp(math.Ceil((info.Y0-south)/info.DY-eps), info.Height-1)
	if c1 < c0 || r1 < r0 {
		return 0, 0, 0, 0, fmt.Errorf("%w: geotiff window %g..%g, %g..%g holds no cell", ErrOutside, west, east, south, north)
	}
	return c0, r0, c1, r1, nil
}

func (info *GeoTIFFInfo) readWindow(r io.ReaderAt, west, south, east, north float64) (*Grid, error) {
	c0, r0, c1, r1, err := info.cellWindow(west, south, east, north)
	if err != nil {
		return nil, err
	}
	cols, rows := c1-c0+1, r1-r0+1
	if int64(cols)*int64(rows) > MaxCells {
		return nil, fmt.Errorf("terrain: geotiff: window of %d × %d cells is over the limit of %d cells; read a smaller window",
			cols, rows, MaxCells)
	}
	g := &Grid{
		CRS:    info.CRS,
		Cols:   cols,
		Rows:   rows,
		X0:     info.X0 + float64(c0)*info.DX,
		Y0:     info.Y0 - float64(r0)*info.DY,
		DX:     info.DX,
		DY:     info.DY,
		Elev:   make([]float32, cols*rows),
		Format: "GeoTIFF",
	}
	// The chunks that hold the window, decoded by up to GOMAXPROCS workers
	// (io.ReaderAt allows parallel ReadAt calls), each with its own
	// buffers, with at most geotiffParallelBytes of chunk buffers in all.
	cw, ch := info.ChunkWidth, info.ChunkHeight
	var jobs [][2]int
	for ty := r0 / ch; ty <= r1/ch; ty++ {
		for tx := c0 / cw; tx <= c1/cw; tx++ {
			jobs = append(jobs, [2]int{tx, ty})
		}
	}
	chunkBytes := cw * ch * info.Sample.Size()
	workers := min(runtime.GOMAXPROCS(0), len(jobs), max(1, geotiffParallelBytes/chunkBytes))
	win := geotiffWindow{g: g, c0: c0, r0: r0, c1: c1, r1: r1}
	if workers <= 1 {
		d := &geotiffDecoder{info: info, r: r}
		for _, j := range jobs {
			if err := d.decodeInto(&win, j[0], j[1]); err != nil {
				return nil, err
			}
		}
		return g, nil
	}
	errs := make([]error, len(jobs))
	var next atomic.Int64
	var failed atomic.Bool
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			d := &geotiffDecoder{info: info, r: r}
			for !failed.Load() {
				i := int(next.Add(1) - 1)
				if i >= len(jobs) {
					return
				}
				if errs[i] = d.decodeInto(&win, jobs[i][0], jobs[i][1]); errs[i] != nil {
					failed.Store(true)
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	return g, nil
}

// geotiffParallelBytes caps the chunk buffers held by parallel decoders.
const geotiffParallelBytes = 64 << 20

// geotiffWindow is the Grid being filled and its cell range in the raster.
type geotiffWindow struct {
	g              *Grid
	c0, r0, c1, r1 int
}

// decodeInto decodes chunk (tx, ty) and copies its cells inside the window
// into the Grid. Workers write disjoint cells.
func (d *geotiffDecoder) decodeInto(win *geotiffWindow, tx, ty int) error {
	info := d.info
	cw, ch, size := info.ChunkWidth, info.ChunkHeight, info.Sample.Size()
	idx := ty*info.chunksAcross() + tx
	// Chunk rows and the part of them inside the window.
	rowsIn := ch
	if !info.Tiled {
		rowsIn = min(ch, info.Height-ty*ch)
	}
	cr0, cr1 := max(win.r0, ty*ch), min(win.r1, ty*ch+rowsIn-1)
	cc0, cc1 := max(win.c0, tx*cw), min(win.c1, tx*cw+cw-1, info.Width-1)
	buf, err := d.chunk(idx, rowsIn)
	if err != nil {
		return err
	}
	cols := win.g.Cols
	for rr := cr0; rr <= cr1; rr++ {
		dst := win.g.Elev[(rr-win.r0)*cols+(cc0-win.c0) : (rr-win.r0)*cols+(cc1-win.c0)+1]
		if buf == nil {
			geotiffFillVoid(dst, info)
			continue
		}
		row := buf[(rr-ty*ch)*cw*size:][:cw*size]
		if err := d.undoPredictor(row); err != nil {
			return err
		}
		d.convert(dst, row[(cc0-tx*cw)*size:])
	}
	return nil
}

// geotiffFillVoid fills the cells of a sparse (absent) chunk: no data when the file
// declares a no-data value, else 0 as GDAL reads them.
func geotiffFillVoid(dst []float32, info *GeoTIFFInfo) {
	v := float32(0)
	if info.HasNoData {
		v = float32(math.NaN())
	}
	for i := range dst {
		dst[i] = v
	}
}

// geotiffDecoder holds the buffers reused from chunk to chunk.
type geotiffDecoder struct {
	info *GeoTIFFInfo
	r    io.ReaderAt
	raw  []byte // compressed bytes of the current chunk
	out  []byte // decoded bytes of the current chunk
	tmp  []byte // one row, for the floating-point predictor
	zr   io.ReadCloser
	br   *bytes.Reader
}

// chunk reads and decodes strip or tile idx of band 1, rows rows of
// ChunkWidth samples. It returns nil for a sparse chunk (offset and count 0).
func (d *geotiffDecoder) chunk(idx, rows int) ([]byte, error) {
	info := d.info
	off, n := info.offsets[idx], info.counts[idx]
	if off == 0 && n == 0 {
		return nil, nil
	}
	want := rows * info.ChunkWidth * info.Sample.Size() // ≤ GeoTIFFMaxChunkBytes, checked in the header
	// Slack allowed past the declared size: TIFF 6.0 lets the last strip
	// hold a whole RowsPerStrip; everything else must decode exactly.
	slack := 0
	if !info.Tiled {
		slack = (info.ChunkHeight - rows) * info.ChunkWidth * info.Sample.Size()
	}
	if n > uint64(GeoTIFFMaxChunkBytes)+uint64(GeoTIFFMaxChunkBytes)/8+4096 {
		return nil, geotiffFormatf("%s %d holds %d compressed bytes, over the limit", info.chunkWord(), idx, n)
	}
	if cap(d.raw) < int(n) {
		d.raw = make([]byte, n)
	}
	raw := d.raw[:n]
	if m, err := d.r.ReadAt(raw, int64(off)); m < len(raw) {
		if err == nil || errors.Is(err, io.EOF) {
			return nil, geotiffFormatf("%s %d is truncated: %d of %d bytes in the file", info.chunkWord(), idx, m, n)
		}
		return nil, fmt.Errorf("terrain: geotiff: reading %s %d: %w", info.chunkWord(), idx, err)
	}
	if info.Compression == GeoTIFFNoCompression {
		if len(raw) < want {
			return nil, geotiffFormatf("%s %d has %d bytes, want %d", info.chunkWord(), idx, len(raw), want)
		}
		return raw[:want], nil
	}
	if d.br == nil {
		d.br = bytes.NewReader(raw)
	} else {
		d.br.Reset(raw)
	}
	var dec io.Reader
	switch info.Compression {
	case GeoTIFFDeflate, GeoTIFFDeflateOld:
		var err error
		if d.zr == nil {
			d.zr, err = zlib.NewReader(d.br)
		} else {
			err = d.zr.(zlib.Resetter).Reset(d.br, nil)
		}
		if err != nil {
			return nil, geotiffFormatf("%s %d: deflate: %v", info.chunkWord(), idx, err)
		}
		dec = d.zr
	case GeoTIFFLZW:
		// TIFF LZW: MSB-first codes with the "early change" of code width,
		// which x/image/tiff/lzw implements (TIFF 6.0 §13).
		lr := lzw.NewReader(d.br, lzw.MSB, 8)
		defer lr.Close()
		dec = lr
	case GeoTIFFPackBits:
		dec = &tiffPackBitsReader{r: d.br}
	}
	out, err := geotiffReadUpTo(dec, d.out[:0], want)
	d.out = out[:0]
	if err != nil {
		if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
			return nil, geotiffFormatf("%s %d is truncated: it decodes to %d bytes, want %d", info.chunkWord(), idx, len(out), want)
		}
		return nil, geotiffFormatf("%s %d: %v", info.chunkWord(), idx, err)
	}
	// A stream that goes on past the declared size is refused (a
	// decompression bomb or a wrong header), reading at most slack+1 bytes.
	extra, _ := io.CopyN(io.Discard, dec, int64(slack)+1)
	if extra > int64(slack) {
		return nil, geotiffFormatf("%s %d decodes to more than its %d bytes", info.chunkWord(), idx, want)
	}
	return out, nil
}

// geotiffReadUpTo reads exactly want bytes from r into buf (reusing its
// capacity). The buffer grows with what the stream really yields, not with
// the size the header declares, so a short stream behind a large header
// costs little memory.
func geotiffReadUpTo(r io.Reader, buf []byte, want int) ([]byte, error) {
	for len(buf) < want {
		if len(buf) == cap(buf) {
			nb := make([]byte, len(buf), min(want, max(2*cap(buf), 64<<10)))
			copy(nb, buf)
			buf = nb
		}
		n, err := r.Read(buf[len(buf):min(cap(buf), want)])
		buf = buf[:len(buf)+n]
		if err != nil {
			if err == io.EOF && len(buf) == want {
				break
			}
			if err == io.EOF {
				err = io.ErrUnexpectedEOF
			}
			return buf, err
		}
	}
	return buf, nil
}

// tiffPackBitsReader decodes PackBits (TIFF 6.0 §9): a header byte n, then
// n+1 literal bytes (0 ≤ n ≤ 127), or one byte repeated 1−n times
// (−127 ≤ n ≤ −1); −128 is a no-op.
type tiffPackBitsReader struct {
	r   *bytes.Reader
	run int  // bytes left in the current run
	lit bool // current run is literal
	b   byte // repeated byte
}

func (p *tiffPackBitsReader) Read(dst []byte) (int, error) {
	n := 0
	for n < len(dst) {
		if p.run == 0 {
			h, err := p.r.ReadByte()
			if err != nil {
				if n > 0 {
					return n, nil
				}
				return 0, io.EOF
			}
			switch c := int(int8(h)); {
			case c >= 0:
				p.run, p.lit = c+1, true
			case c == -128:
				continue
			default:
				b, err := p.r.ReadByte()
				if err != nil {
					return n, io.ErrUnexpectedEOF
				}
				p.run, p.lit, p.b = 1-c, false, b
			}
		}
		k := min(p.run, len(dst)-n)
		if p.lit {
			m, _ := p.r.Read(dst[n : n+k])
			n += m
			p.run -= m
			if m < k {
				return n, io.ErrUnexpectedEOF
			}
			continue
		}
		for i := range k {
			dst[n+i] = p.b
		}
		n += k
		p.run -= k
	}
	return n, nil
}

// undoPredictor reverses the predictor on one decoded row of ChunkWidth
// samples in place.
//
// Horizontal differencing (Predictor 2, TIFF 6.0 §14): each sample is
// stored as its difference from the previous one, modulo 2^bits, in the
// file's byte order; float samples are differenced as the unsigned
// integers of their bit patterns (libtiff's reading, confirmed by
// GDAL-made Float32 and Float64 PREDICTOR=2 fixtures). Floating-point predictor (3, Adobe Technical Note 3):
// the row's bytes are reordered so that all most-significant bytes come
// first, then the next, …, and then byte-differenced; this order is
// big-endian whatever the file's byte order.
func (d *geotiffDecoder) undoPredictor(row []byte) error {
	info := d.info
	switch info.Predictor {
	case 2:
		o := info.order
		switch info.Sample.Size() {
		case 2:
			prev := o.Uint16(row)
			for i := 2; i+1 < len(row); i += 2 {
				prev += o.Uint16(row[i:])
				o.PutUint16(row[i:], prev)
			}
		case 4:
			prev := o.Uint32(row)
			for i := 4; i+3 < len(row); i += 4 {
				prev += o.Uint32(row[i:])
				o.PutUint32(row[i:], prev)
			}
		case 8:
			prev := o.Uint64(row)
			for i := 8; i+7 < len(row); i += 8 {
				prev += o.Uint64(row[i:])
				o.PutUint64(row[i:], prev)
			}
		}
	case 3:
		for i := 1; i < len(row); i++ {
			row[i] += row[i-1]
		}
		if cap(d.tmp) < len(row) {
			d.tmp = make([]byte, len(row))
		}
		tmp := d.tmp[:len(row)]
		copy(tmp, row)
		bps := info.Sample.Size()
		wc := len(row) / bps
		// Write the samples back in the file's byte order, so that convert
		// reads every layout the same way.
		if info.order == binary.BigEndian {
			for i := range wc {
				for k := range bps {
					row[i*bps+k] = tmp[k*wc+i]
				}
			}
		} else {
			for i := range wc {
				for k := range bps {
					row[i*bps+bps-1-k] = tmp[k*wc+i]
				}
			}
		}
	}
	return nil
}

// convert turns len(dst) samples from src (file byte order) into float32
// metres, NaN for no data. A floating-point sample of ±Inf (or a float64
// beyond float32) is no elevation either and is read as no data.
func (d *geotiffDecoder) convert(dst []float32, src []byte) {
	d.convertRaw(dst, src)
	if s := d.info.Sample; s == SampleFloat32 || s == SampleFloat64 {
		nan := float32(math.NaN())
		for i, v := range dst {
			if math.IsInf(float64(v), 0) {
				dst[i] = nan
			}
		}
	}
}

func (d *geotiffDecoder) convertRaw(dst []float32, src []byte) {
	info := d.info
	o := info.order
	nan := float32(math.NaN())
	nd, has := info.NoData, info.HasNoData
	switch info.Sample {
	case SampleInt16:
		ndv, ok := int64(0), false
		if has && nd == math.Trunc(nd) && nd >= math.MinInt16 && nd <= math.MaxInt16 {
			ndv, ok = int64(nd), true
		}
		for i := range dst {
			v := int16(o.Uint16(src[2*i:]))
			if ok && int64(v) == ndv {
				dst[i] = nan
			} else {
				dst[i] = float32(v)
			}
		}
	case SampleUint16:
		ndv, ok := int64(0), false
		if has && nd == math.Trunc(nd) && nd >= 0 && nd <= math.MaxUint16 {
			ndv, ok = int64(nd), true
		}
		for i := range dst {
			v := o.Uint16(src[2*i:])
			if ok && int64(v) == ndv {
				dst[i] = nan
			} else {
				dst[i] = float32(v)
			}
		}
	case SampleInt32:
		ndv, ok := int64(0), false
		if has && nd == math.Trunc(nd) && nd >= math.MinInt32 && nd <= math.MaxInt32 {
			ndv, ok = int64(nd), true
		}
		for i := range dst {
			v := int32(o.Uint32(src[4*i:]))
			if ok && int64(v) == ndv {
				dst[i] = nan
			} else {
				dst[i] = float32(v)
			}
		}
	case SampleFloat32:
		ndv := float32(nd)
		check := has && !math.IsNaN(nd)
		src = src[:4*len(dst)]
		if o == binary.LittleEndian {
			for i := range dst {
				v := math.Float32frombits(binary.LittleEndian.Uint32(src[4*i:]))
				if check && v == ndv {
					v = nan
				}
				dst[i] = v
			}
		} else {
			for i := range dst {
				v := math.Float32frombits(binary.BigEndian.Uint32(src[4*i:]))
				if check && v == ndv {
					v = nan
				}
				dst[i] = v
			}
		}
	case SampleFloat64:
		check := has && !math.IsNaN(nd)
		for i := range dst {
			v := math.Float64frombits(o.Uint64(src[8*i:]))
			if check && v == nd {
				v = math.NaN()
			}
			dst[i] = float32(v)
		}
	}
}
