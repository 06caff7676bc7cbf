package terrain

import (
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
)

// SRTM .hgt tiles (USGS SRTM documentation; JPL SRTM FAQ): a square of
// n×n big-endian signed 16-bit samples, metres above the EGM96 geoid, with no
// header; n = 1201 (3 arc-second, SRTM3) or 3601 (1 arc-second, SRTM1). The
// first row is the northern edge and each row runs west to east. The name
// gives the latitude and longitude of the south-west sample (N34W119 covers
// 34–35°N, 118–119°W), and edge rows and columns duplicate the neighbouring
// tiles' edges. −32768 marks a void.
const (
	hgtVoid     = -32768
	hgtSamples3 = 1201
	hgtSamples1 = 3601
)

// ErrHGTName is returned (wrapped) when a .hgt file's name does not give its
// south-west corner as [NS]dd[EW]ddd.
var ErrHGTName = errors.New("terrain: hgt file name must start with the tile's south-west corner, like N34W119")

// ParseHGTName returns the south-west corner (integer degrees) given by an
// SRTM tile name such as "N34W119.hgt" or "s01e024.hgt" (case-insensitive;
// any text after the seven characters is ignored).
func ParseHGTName(name string) (lat, lon int, err error) {
	b := strings.ToUpper(filepath.Base(name))
	if len(b) < 7 || (b[0] != 'N' && b[0] != 'S') || (b[3] != 'E' && b[3] != 'W') {
		return 0, 0, fmt.Errorf("%w (got %q)", ErrHGTName, filepath.Base(name))
	}
	la, err1 := strconv.Atoi(b[1:3])
	lo, err2 := strconv.Atoi(b[4:7])
	if err1 != nil || err2 != nil || strings.ContainsAny(b[1:7], "+-") {
		return 0, 0, fmt.Errorf("%w (got %q)", ErrHGTName, filepath.Base(name))
	}
	if b[0] == 'S' {
		la = -la
	}
	if b[3] == 'W' {
		lo = -lo
	}
	if la < -90 || la > 89 || lo < -180 || lo > 179 {
		return 0, 0, fmt.Errorf("%w (corner %d, %d is off the globe)", ErrHGTName, la, lo)
	}
	return la, lo, nil
}

// ReadHGTInfo returns the header of an SRTM tile — its georeference and
// dimensions, Elev nil — from its name and file size (bytes), without
// reading any sample. A size other than 2·1201² or 2·3601² bytes is refused
// (a truncated or foreign file).
func ReadHGTInfo(name string, size int64) (*Grid, error) {
	lat, lon, err := ParseHGTName(name)
	if err != nil {
		return nil, err
	}
	var n int
	switch size {
	case 2 * hgtSamples3 * hgtSamples3:
		n = hgtSamples3
	case 2 * hgtSamples1 * hgtSamples1:
		n = hgtSamples1
	default:
		return nil, fmt.Errorf("terrain: hgt %s: %d bytes is not an SRTM tile (%d bytes for 1201×1201 or %d for 3601×3601 samples); truncated or not an .hgt file",
			filepath.Base(name), size, 2*hgtSamples3*hgtSamples3, 2*hgtSamples1*hgtSamples1)
	}
	d := 1 / float64(n-1)
	return &Grid{
		CRS:  CRS{EPSG: 4326},
		Cols: n, Rows: n,
		X0: float64(lon), Y0: float64(lat + 1),
		DX: d, DY: d,
		Format: "SRTM hgt",
		Name:   filepath.Base(name),
	}, nil
}

// ReadHGT reads a whole SRTM tile from r (size bytes long; name gives the
// corner). Voids become NaN.
func ReadHGT(r io.ReaderAt, size int64, name string) (*Grid, error) {
	h, err := ReadHGTInfo(name, size)
	if err != nil {
		return nil, err
	}
	return readHGTCells(r, h, 0, 0, h.Cols-1, h.Rows-1)
}

// ReadHGTWindow reads the part of an SRTM tile that covers the
// longitude/latitude box (degrees) plus one cell on every side, seeking to
// the rows it needs and reading only the needed columns of each. A box that
// misses the tile is an error wrapping ErrOutside.
func ReadHGTWindow(r io.ReaderAt, size int64, name string, west, south, east, north float64) (*Grid, error) {
	h, err := ReadHGTInfo(name, size)
	if err != nil {
		return nil, err
	}
	c0, r0, c1, r1, ok := h.cellWindow(west, south, east, north)
	if !ok {
		return nil, fmt.Errorf("%w: %s does not cover %.6g..%.6g E, %.6g..%.6g N", ErrOutside, h.Name, west, east, south, north)
	}
	return readHGTCells(r, h, c0, r0, c1, r1)
}

// ErrOutside is returned (wrapped) when a requested window misses a grid.
var ErrOutside = errors.New("terrain: window outside the terrain")

// readHGTCells reads cells c0..c1 × r0..r1 (inclusive) of tile header h.
func readHGTCells(r io.ReaderAt, h *Grid, c0, r0, c1, r1 int) (*Grid, error) {
	g := *h
	g.Cols, g.Rows = c1-c0+1, r1-r0+1
	g.X0 = h.X0 + float64(c0)*h.DX
	g.Y0 = h.Y0 - float64(r0)*h.DY
	g.Elev = make([]float32, g.Cols*g.Rows)
	rowBytes := 2 * int64(h.Cols)
	// Read whole-width blocks of rows when the window is wide, one span per
	// row otherwise; either way at most about 1 MiB of buffer.
	full := g.Cols > h.Cols/2
	rowsPerRead := 1
	if full {
		rowsPerRead = max(1, (1<<20)/int(rowBytes))
	}
	var buf []byte
	for rr := 0; rr < g.Rows; rr += rowsPerRead {
		nr := min(rowsPerRead, g.Rows-rr)
		var off int64
		var span int
		if full {
			off = int64(r0+rr) * rowBytes
			span = nr * int(rowBytes)
		} else {
			off = int64(r0+rr)*rowBytes + 2*int64(c0)
			span = 2 * g.Cols
		}
		if cap(buf) < span {
			buf = make([]byte, span)
		}
		buf = buf[:span]
		if n, err := r.ReadAt(buf, off); n < span {
			if err == nil || err == io.EOF {
				err = io.ErrUnexpectedEOF
			}
			return nil, fmt.Errorf("terrain: hgt %s: reading row %d: %w", h.Name, r0+rr, err)
		}
		for k := 0; k < nr; k++ {
			src := buf
			if full {
				src = buf[k*int(rowBytes)+2*c0 : k*int(rowBytes)+2*(c1+1)]
			}
			dst := g.Elev[(rr+k)*g.Cols : (rr+k+1)*g.Cols]
			decodeHGTRow(dst, src)
		}
	}
	return &g, nil
}

// decodeHGTRow converts big-endian int16 samples to float32, voids to NaN.
func decodeHGTRow(dst []float32, src []byte) {
	nan := float32(math.NaN())
	src = src[:2*len(dst)]
	for i := range dst {
		v := int16(uint16(src[2*i])<<8 | uint16(src[2*i+1]))
		if v == hgtVoid {
			dst[i] = nan
		} else {
			dst[i] = float32(v)
		}
	}
}

// WriteHGT writes g as an SRTM tile: g must be geographic, square with 1201
// or 3601 samples and 1/(n−1)° spacing on whole-degree edges. Elevations are
// rounded to whole metres and clamped to the int16 range; NaN is written as
// the void value. It is used to make test tiles.
func WriteHGT(w io.Writer, g *Grid) error {
	if g.CRS.EPSG != 4326 || g.Cols != g.Rows || (g.Cols != hgtSamples3 && g.Cols != hgtSamples1) {
		return fmt.Errorf("terrain: hgt: can only write a geographic 1201² or 3601² grid, not %d×%d EPSG:%d", g.Cols, g.Rows, g.CRS.EPSG)
	}
	buf := make([]byte, 2*g.Cols)
	for r := 0; r < g.Rows; r++ {
		for c, v := range g.Elev[r*g.Cols : (r+1)*g.Cols] {
			s := int16(hgtVoid)
			if v == v {
				s = int16(math.Max(-32767, math.Min(32767, math.Round(float64(v)))))
			}
			buf[2*c], buf[2*c+1] = byte(uint16(s)>>8), byte(s)
		}
		if _, err := w.Write(buf); err != nil {
			return fmt.Errorf("terrain: hgt: %w", err)
		}
	}
	return nil
}

// HGTName returns the tile name ("N34W119.hgt") for a south-west corner.
func HGTName(lat, lon int) string {
	ns, ew := 'N', 'E'
	if lat < 0 {
		ns, lat = 'S', -lat
	}
	if lon < 0 {
		ew, lon = 'W', -lon
	}
	return fmt.Sprintf("%c%02d%c%03d.hgt", ns, lat, ew, lon)
}
