package terrain

import (
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
)

// ESRI ASCII grid (.asc; Esri ArcGIS "Esri ASCII raster format"): a header of
// case-insensitive "KEY value" lines — NCOLS, NROWS, XLLCORNER or XLLCENTER,
// YLLCORNER or YLLCENTER, CELLSIZE (or DX and DY), optional NODATA_VALUE
// (default −9999) — then NCOLS×NROWS whitespace-separated numbers, row-major,
// the first row being the northern one. XLLCENTER = XLLCORNER + CELLSIZE/2.
//
// The format carries no coordinate reference system. It comes from a .prj
// sidecar (see ParsePRJ) or from the caller; without one the readers refuse
// the file, whatever its coordinates look like: a UTM grid's numbers can be
// mistaken for degrees only in contrived cases, but other projected grids
// can, and the cost of a wrong guess is a glide planned over the wrong
// ground.

// ParseError is an error at a line of an ESRI ASCII grid.
type ParseError struct {
	Line int // 1-based line number
	Err  error
}

func (e *ParseError) Error() string { return fmt.Sprintf("terrain: asc line %d: %v", e.Line, e.Err) }

func (e *ParseError) Unwrap() error { return e.Err }

// ErrNoCRS is returned (wrapped) when an ASCII grid has no CRS: neither a
// .prj sidecar nor one given by the caller.
var ErrNoCRS = errors.New("terrain: the ASCII grid has no CRS (no .prj sidecar); give one, e.g. EPSG:4326 for lon/lat degrees or EPSG:326zz for WGS84 UTM zone zz north")

const ascMaxToken = 1 << 10

// ascScanner splits an ASCII grid into whitespace-separated tokens and
// counts lines, without holding more than a fixed buffer.
type ascScanner struct {
	r        io.Reader
	buf      []byte
	pos, end int
	line     int
	eof      bool
	err      error
}

func newASCScanner(r io.Reader) *ascScanner {
	return &ascScanner{r: r, buf: make([]byte, 64<<10), line: 1}
}

func (s *ascScanner) fill() {
	if s.eof {
		return
	}
	copy(s.buf, s.buf[s.pos:s.end])
	s.end -= s.pos
	s.pos = 0
	n, err := s.r.Read(s.buf[s.end:])
	s.end += n
	if err != nil {
		s.eof = true
		if err != io.EOF {
			s.err = err
		}
	}
}

// next returns the next token and the line it starts on; ok is false at the
// end of input or on a read error (s.err).
func (s *ascScanner) next() (tok []byte, line int, ok bool) {
	for {
		for s.pos < s.end {
			c := s.buf[s.pos]
			if c == '\n' {
				s.line++
			} else if c != ' ' && c != '\t' && c != '\r' && c != '\f' && c != '\v' {
				goto token
			}
			s.pos++
		}
		if s.eof {
			return nil, s.line, false
		}
		s.fill()
	}
token:
	line = s.line
	i := s.pos
	for {
		for i < s.end {
			c := s.buf[i]
			if c == ' ' || c == '\n' || c == '\t' || c == '\r' || c == '\f' || c == '\v' {
				if i-s.pos > ascMaxToken {
					s.err = &ParseError{Line: line, Err: fmt.Errorf("token longer than %d bytes", ascMaxToken)}
					return nil, line, false
				}
				tok = s.buf[s.pos:i]
				s.pos = i
				return tok, line, true
			}
			i++
		}
		if i-s.pos > ascMaxToken {
			s.err = &ParseError{Line: line, Err: fmt.Errorf("token longer than %d bytes", ascMaxToken)}
			return nil, line, false
		}
		if s.eof {
			if i-s.pos > ascMaxToken {
				s.err = &ParseError{Line: line, Err: fmt.Errorf("token longer than %d bytes", ascMaxToken)}
				return nil, line, false
			}
			tok = s.buf[s.pos:i]
			s.pos = i
			return tok, line, len(tok) > 0
		}
		k := i - s.pos
		s.fill()
		i = s.pos + k
	}
}

// parseNumber parses a decimal number quickly when it is plain
// ([-+]digits[.digits]) and falls back to strconv otherwise.
func parseNumber(b []byte) (float64, bool) {
	i, neg := 0, false
	if len(b) > 0 && (b[0] == '-' || b[0] == '+') {
		neg, i = b[0] == '-', 1
	}
	var m uint64
	digits, frac := 0, 0
	seenDot := false
	for ; i < len(b); i++ {
		c := b[i]
		switch {
		case c >= '0' && c <= '9':
			if digits >= 18 {
				goto slow
			}
			m = m*10 + uint64(c-'0')
			digits++
			if seenDot {
				frac++
			}
		case c == '.' && !seenDot:
			seenDot = true
		default:
			goto slow
		}
	}
	if digits == 0 {
		return 0, false
	}
	{
		v := float64(m)
		if frac > 0 {
			v /= pow10[frac]
		}
		if neg {
			v = -v
		}
		return v, true
	}
slow:
	// Out of range is not a number here: strconv returns ±Inf for an
	// overflow (a 5000-digit token), and 0 for an underflow, which is kept.
	v, err := strconv.ParseFloat(string(b), 64)
	if err != nil && !(errors.Is(err, strconv.ErrRange) && v == 0) {
		return 0, false
	}
	return v, true
}

var pow10 = [...]float64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18}

// ascHeader is a parsed ASCII grid header.
type ascHeader struct {
	grid    Grid // georeference, Elev nil
	noData  float64
	pending []byte // first data token, already read
	line    int    // its line
}

func readASCHeader(s *ascScanner, crs CRS) (*ascHeader, error) {
	h := &ascHeader{noData: -9999}
	seen := map[string]float64{}
	for {
		tok, line, ok := s.next()
		if !ok {
			if s.err != nil {
				return nil, s.err
			}
			return nil, &ParseError{Line: line, Err: errors.New("file ends inside the header (no samples)")}
		}
		if c := tok[0]; !(c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z') || strings.EqualFold(string(tok), "nan") || strings.EqualFold(string(tok), "inf") {
			h.pending, h.line = append([]byte(nil), tok...), line
			break
		}
		key := strings.ToLower(string(tok))
		switch key {
		case "ncols", "nrows", "xllcorner", "xllcenter", "yllcorner", "yllcenter", "cellsize", "dx", "dy", "nodata_value":
		default:
			return nil, &ParseError{Line: line, Err: fmt.Errorf("unknown header key %.40q", tok)}
		}
		if _, dup := seen[key]; dup {
			return nil, &ParseError{Line: line, Err: fmt.Errorf("header key %s given twice", strings.ToUpper(key))}
		}
		vt, vline, ok := s.next()
		if !ok || vline != line {
			return nil, &ParseError{Line: line, Err: fmt.Errorf("header key %s has no value", strings.ToUpper(key))}
		}
		v, ok := parseNumber(vt)
		if !ok || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &ParseError{Line: line, Err: fmt.Errorf("%s value %.40q is not a number", strings.ToUpper(key), vt)}
		}
		seen[key] = v
	}
	need := func(keys ...string) (float64, string, error) {
		for _, k := range keys {
			if v, ok := seen[k]; ok {
				return v, k, nil
			}
		}
		return 0, "", &ParseError{Line: h.line, Err: fmt.Errorf("header lacks %s", strings.ToUpper(strings.Join(keys, " or ")))}
	}
	nc, _, err := need("ncols")
	if err != nil {
		return nil, err
	}
	nr, _, err := need("nrows")
	if err != nil {
		return nil, err
	}
	if nc != math.Trunc(nc) || nr != math.Trunc(nr) || nc < 1 || nr < 1 || nc > 1e9 || nr > 1e9 {
		return nil, &ParseError{Line: h.line, Err: fmt.Errorf("NCOLS %v and NROWS %v must be positive whole numbers", nc, nr)}
	}
	xll, xk, err := need("xllcorner", "xllcenter")
	if err != nil {
		return nil, err
	}
	yll, yk, err := need("yllcorner", "yllcenter")
	if err != nil {
		return nil, err
	}
	dx, dy := seen["cellsize"], seen["cellsize"]
	if _, ok := seen["cellsize"]; !ok {
		if dx, _, err = need("dx"); err != nil {
			return nil, &ParseError{Line: h.line, Err: errors.New("header lacks CELLSIZE")}
		}
		if dy, _, err = need("dy"); err != nil {
			return nil, err
		}
	}
	if !(dx > 0 && dy > 0) {
		return nil, &ParseError{Line: h.line, Err: fmt.Errorf("cell size %v×%v is not positive", dx, dy)}
	}
	if v, ok := seen["nodata_value"]; ok {
		h.noData = v
	}
	g := &h.grid
	g.Cols, g.Rows, g.DX, g.DY = int(nc), int(nr), dx, dy
	g.X0, g.Y0 = xll, yll+(nr-1)*dy
	if xk == "xllcorner" {
		g.X0 += dx / 2
	}
	if yk == "yllcorner" {
		g.Y0 += dy / 2
	}
	g.CRS = crs
	g.Format = "ESRI ASCII grid"
	if crs.EPSG == 0 {
		return nil, ErrNoCRS
	}
	if err := checkHeader(g); err != nil {
		return nil, err
	}
	return h, nil
}

// ReadASCInfo reads only the header of an ESRI ASCII grid from r and returns
// it as a Grid with Elev nil, in the given CRS (from ParsePRJ or the caller).
// crs.EPSG == 0 is refused with ErrNoCRS.
func ReadASCInfo(r io.Reader, crs CRS) (*Grid, error) {
	h, err := readASCHeader(newASCScanner(r), crs)
	if err != nil {
		return nil, err
	}
	g := h.grid
	return &g, nil
}

// ReadASC reads a whole ESRI ASCII grid in the given CRS. Samples equal to
// NODATA_value (and NaN) become voids. A file with fewer or more numbers than
// NCOLS×NROWS is refused with a *ParseError. Memory grows with the samples
// actually present, so a hostile header alone allocates nothing large.
func ReadASC(r io.Reader, crs CRS) (*Grid, error) {
	s := newASCScanner(r)
	h, err := readASCHeader(s, crs)
	if err != nil {
		return nil, err
	}
	return readASCCells(s, h, 0, 0, h.grid.Cols-1, h.grid.Rows-1, true)
}

// ReadASCWindow streams an ESRI ASCII grid and keeps only the rows and
// columns covering the longitude/latitude box (degrees) plus one cell on
// every side; it stops reading after the last row it needs. A box that
// misses the grid is an error wrapping ErrOutside.
func ReadASCWindow(r io.Reader, crs CRS, west, south, east, north float64) (*Grid, error) {
	s := newASCScanner(r)
	h, err := readASCHeader(s, crs)
	if err != nil {
		return nil, err
	}
	c0, r0, c1, r1, ok := h.grid.cellWindow(west, south, east, north)
	if !ok {
		return nil, fmt.Errorf("%w: the grid does not cover %.6g..%.6g E, %.6g..%.6g N", ErrOutside, west, east, south, north)
	}
	return readASCCells(s, h, c0, r0, c1, r1, c0 == 0 && r0 == 0 && c1 == h.grid.Cols-1 && r1 == h.grid.Rows-1)
}

func readASCCells(s *ascScanner, h *ascHeader, c0, r0, c1, r1 int, whole bool) (*Grid, error) {
	g := h.grid
	g.Cols, g.Rows = c1-c0+1, r1-r0+1
	if err := checkWindow(g.Cols, g.Rows); err != nil {
		return nil, err
	}
	g.X0 = h.grid.X0 + float64(c0)*h.grid.DX
	g.Y0 = h.grid.Y0 - float64(r0)*h.grid.DY
	cols := int64(h.grid.Cols)
	total := cols * int64(h.grid.Rows)
	last := int64(r1+1) * cols // values needed
	nodata := float32(h.noData)
	nan := float32(math.NaN())
	g.Elev = make([]float32, 0, min(int64(g.Cols)*int64(g.Rows), 1<<20))
	tok, line := h.pending, h.line
	var k int64
	for ; k < last; k++ {
		if k > 0 {
			var ok bool
			var tline int
			tok, tline, ok = s.next()
			if ok {
				line = tline
			} else {
				if s.err != nil {
					return nil, s.err
				}
				return nil, &ParseError{Line: line, Err: fmt.Errorf("file ends after %d of %d samples (NCOLS %d × NROWS %d); truncated?", k, total, h.grid.Cols, h.grid.Rows)}
			}
		}
		r, c := int(k/cols), int(k%cols)
		if r < r0 || c < c0 || c > c1 {
			// Check the token is plausible without converting it.
			if len(tok) > 40 {
				return nil, &ParseError{Line: line, Err: fmt.Errorf("sample %.40q… is not a number", tok)}
			}
			continue
		}
		v, ok := parseNumber(tok)
		if !ok {
			return nil, &ParseError{Line: line, Err: fmt.Errorf("sample %d (row %d, column %d) %.40q is not a number", k+1, r+1, c+1, tok)}
		}
		f := float32(v)
		if math.IsNaN(v) || math.IsInf(float64(f), 0) {
			// A void is NODATA_value; "nan" or "inf" or a value beyond
			// float32 is a broken file, not ground.
			return nil, &ParseError{Line: line, Err: fmt.Errorf("sample %d (row %d, column %d) %.40q is not a finite elevation (voids are NODATA_value)", k+1, r+1, c+1, tok)}
		}
		if f == nodata {
			f = nan
		}
		g.Elev = append(g.Elev, f)
	}
	if whole {
		if tok, line, ok := s.next(); ok {
			return nil, &ParseError{Line: line, Err: fmt.Errorf("more samples than NCOLS %d × NROWS %d (%.40q)", h.grid.Cols, h.grid.Rows, tok)}
		}
		if s.err != nil {
			return nil, s.err
		}
	}
	return &g, nil
}

var (
	prjUTM      = regexp.MustCompile(`(?i)UTM[ _]zone[ _]?(\d{1,2})\s*([NS])`)
	prjTopEPSG  = regexp.MustCompile(`(?is)(?:AUTHORITY\[\s*"EPSG"\s*,\s*"(\d+)"\s*\]|ID\[\s*"EPSG"\s*,\s*(\d+)\s*\])\s*\]\s*$`)
	prjOldProj  = regexp.MustCompile(`(?im)^\s*PROJECTION\s+(\w+)`)
	prjOldZone  = regexp.MustCompile(`(?im)^\s*ZONE\s+(-?\d+)`)
	prjOldDatum = regexp.MustCompile(`(?im)^\s*DATUM\s+(\w+)`)
)

// ParsePRJ recognises the CRS of a .prj sidecar: WKT (1 or 2) for WGS84
// geographic (EPSG:4326) or a WGS84 / ETRS89 UTM zone (326zz, 327zz, 258zz),
// by its top-level EPSG authority when present, otherwise by its name; and
// the older Esri keyword form ("Projection GEOGRAPHIC|UTM", "Zone n",
// "Datum WGS84"; a negative zone meaning south is recalled from memory).
// Anything else is refused, naming what was found.
func ParsePRJ(text string) (CRS, error) {
	t := strings.TrimSpace(text)
	if m := prjTopEPSG.FindStringSubmatch(t); m != nil {
		code, _ := strconv.Atoi(m[1] + m[2])
		c := CRS{EPSG: code}
		if err := CheckCRS(c); err != nil {
			return CRS{}, fmt.Errorf("terrain: .prj names %w", err)
		}
		return c, nil
	}
	up := strings.ToUpper(t)
	wgs := strings.Contains(up, "WGS_1984") || strings.Contains(up, "WGS 84") || strings.Contains(up, "WGS84") || strings.Contains(up, "WGS_84")
	etrs := strings.Contains(up, "ETRS")
	if strings.HasPrefix(up, "PROJCS[") || strings.HasPrefix(up, "PROJCRS[") || strings.HasPrefix(up, "PROJECTEDCRS[") {
		m := prjUTM.FindStringSubmatch(t)
		if m == nil {
			return CRS{}, fmt.Errorf("terrain: .prj is a projected CRS other than UTM (%.60s…); only EPSG:4326 and UTM zones are supported", t)
		}
		zone, _ := strconv.Atoi(m[1])
		south := strings.EqualFold(m[2], "S")
		return utmCRS(zone, south, wgs, etrs)
	}
	if strings.HasPrefix(up, "GEOGCS[") || strings.HasPrefix(up, "GEOGCRS[") || strings.HasPrefix(up, "GEODCRS[") {
		if wgs {
			return CRS{EPSG: 4326}, nil
		}
		return CRS{}, fmt.Errorf("terrain: .prj is a geographic CRS not on WGS84 (%.60s…)", t)
	}
	if m := prjOldProj.FindStringSubmatch(t); m != nil {
		d := prjOldDatum.FindStringSubmatch(t)
		wgs = d != nil && strings.EqualFold(d[1], "WGS84")
		switch strings.ToUpper(m[1]) {
		case "GEOGRAPHIC":
			if wgs {
				return CRS{EPSG: 4326}, nil
			}
		case "UTM":
			z := prjOldZone.FindStringSubmatch(t)
			if z != nil && wgs {
				zone, _ := strconv.Atoi(z[1])
				return utmCRS(abs(zone), zone < 0, true, false)
			}
		}
		return CRS{}, fmt.Errorf("terrain: .prj (Esri keyword form) is not WGS84 geographic or WGS84 UTM")
	}
	return CRS{}, fmt.Errorf("terrain: .prj not recognised (%.60q)", t)
}

func utmCRS(zone int, south, wgs, etrs bool) (CRS, error) {
	if zone < 1 || zone > 60 {
		return CRS{}, fmt.Errorf("terrain: .prj UTM zone %d out of range 1–60", zone)
	}
	switch {
	case wgs && south:
		return CRS{EPSG: 32700 + zone}, nil
	case wgs:
		return CRS{EPSG: 32600 + zone}, nil
	case etrs && !south:
		return CRS{EPSG: 25800 + zone}, nil
	}
	return CRS{}, fmt.Errorf("terrain: .prj UTM zone %d is not on WGS84 or ETRS89", zone)
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// WriteASC writes g as an ESRI ASCII grid (corner registration, square
// cells required, NODATA_value −9999). It is used to make test fixtures.
func WriteASC(w io.Writer, g *Grid) error {
	if g.DX != g.DY {
		return fmt.Errorf("terrain: asc: cells must be square, not %g×%g", g.DX, g.DY)
	}
	var b strings.Builder
	fmt.Fprintf(&b, "ncols %d\nnrows %d\nxllcorner %s\nyllcorner %s\ncellsize %s\nNODATA_value -9999\n",
		g.Cols, g.Rows,
		strconv.FormatFloat(g.X0-g.DX/2, 'g', -1, 64),
		strconv.FormatFloat(g.Y0-(float64(g.Rows)-0.5)*g.DY, 'g', -1, 64),
		strconv.FormatFloat(g.DX, 'g', -1, 64))
	for r := 0; r < g.Rows; r++ {
		for c := 0; c < g.Cols; c++ {
			if c > 0 {
				b.WriteByte(' ')
			}
			v := g.Elev[r*g.Cols+c]
			if v != v {
				b.WriteString("-9999")
			} else {
				b.WriteString(strconv.FormatFloat(float64(v), 'g', -1, 32))
			}
		}
		b.WriteByte('\n')
		if b.Len() > 1<<16 || r == g.Rows-1 {
			if _, err := io.WriteString(w, b.String()); err != nil {
				return fmt.Errorf("terrain: asc: %w", err)
			}
			b.Reset()
		}
	}
	return nil
}

// PRJ returns the WKT1 text of a .prj sidecar for c, in the form GDAL
// writes (for EPSG:32727 it is byte for byte testdata/asc/utm_center.prj,
// which GDAL wrote): EPSG:4326, WGS84 UTM 326zz/327zz, ETRS89 UTM 258zz, each
// with its top-level EPSG authority, so ParsePRJ (and GDAL) read the CRS
// back. The ETRS89 datum and GRS 1980 spheroid lines are from memory of
// GDAL's output. Other CRSs are an error.
func PRJ(c CRS) (string, error) {
	const prime = `PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]]`
	wgs := `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],` + prime
	etrs := `GEOGCS["ETRS89",DATUM["European_Terrestrial_Reference_System_1989",SPHEROID["GRS 1980",6378137,298.257222101,AUTHORITY["EPSG","7019"]],AUTHORITY["EPSG","6258"]],` + prime
	if c.EPSG == 4326 {
		return wgs + `,AXIS["Latitude",NORTH],AXIS["Longitude",EAST],AUTHORITY["EPSG","4326"]]`, nil
	}
	zone, south, ok := UTMZone(c.EPSG)
	if !ok {
		return "", fmt.Errorf("terrain: prj: EPSG:%d is not 4326 or a UTM zone", c.EPSG)
	}
	geog, name := wgs+`,AUTHORITY["EPSG","4326"]]`, "WGS 84"
	if c.EPSG >= 25800 && c.EPSG < 25900 {
		geog, name = etrs+`,AUTHORITY["EPSG","4258"]]`, "ETRS89"
	}
	hemi, northing := "N", 0
	if south {
		hemi, northing = "S", 10000000
	}
	return fmt.Sprintf(`PROJCS["%s / UTM zone %d%s",%s,PROJECTION["Transverse_Mercator"],PARAMETER["latitude_of_origin",0],`+
		`PARAMETER["central_meridian",%d],PARAMETER["scale_factor",0.9996],PARAMETER["false_easting",500000],`+
		`PARAMETER["false_northing",%d],UNIT["metre",1,AUTHORITY["EPSG","9001"]],AXIS["Easting",EAST],AXIS["Northing",NORTH],AUTHORITY["EPSG","%d"]]`,
		name, zone, hemi, geog, 6*zone-183, northing, c.EPSG), nil
}
