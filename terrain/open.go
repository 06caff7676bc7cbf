package terrain

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// Source is an elevation data set the solvers read windows of: one file or
// a mosaic of several.
type Source interface {
	// Extent is the longitude/latitude box (degrees, WGS84) the data covers.
	Extent() (west, south, east, north float64)
	// Resolution is the finest cell spacing in metres (the smaller of the
	// east–west and north–south spacing; see Grid.CellSizeMetres).
	Resolution() float64
	// Window returns one Grid covering the longitude/latitude box (plus a
	// cell of margin where the data has it), reading only the files and rows
	// that cover it. A box that misses the data is an error wrapping
	// ErrOutside; west must not exceed east (no antimeridian crossing).
	Window(west, south, east, north float64) (*Grid, error)
	// Describe names the format and files, for output.
	Describe() string
}

// OpenOptions tune Open. The zero value is the conservative default: an
// ASCII grid needs a .prj sidecar, and voids stay voids (obstacles).
type OpenOptions struct {
	// CRS is used for ESRI ASCII grids: it overrides a .prj sidecar, and is
	// needed when there is none. Zero means "from the .prj".
	CRS CRS
	// FillVoids > 0 fills void regions of at most this many cells in every
	// window (see FillVoids). 0 keeps voids as obstacles.
	FillVoids int
}

// FileError is an error about one input file.
type FileError struct {
	Path string
	Err  error
}

func (e *FileError) Error() string { return e.Path + ": " + e.Err.Error() }

func (e *FileError) Unwrap() error { return e.Err }

// ErrUnknownFormat is returned (wrapped in a *FileError) for a file whose
// name ends in none of .tif, .tiff, .hgt, .asc.
var ErrUnknownFormat = errors.New("terrain: unknown format (want .tif, .tiff, .hgt or .asc)")

// Open opens elevation files as one Source with default options; see
// OpenWith.
func Open(paths ...string) (Source, error) { return OpenWith(OpenOptions{}, paths...) }

// OpenWith opens files (.tif/.tiff GeoTIFF, .hgt SRTM tile, .asc ESRI ASCII
// grid) or directories (their files with those extensions, not recursing)
// as one Source. Only headers are read here; samples are read by Window.
// Several files form a mosaic. Errors about a file are *FileError.
func OpenWith(opts OpenOptions, paths ...string) (Source, error) {
	var files []string
	for _, p := range paths {
		st, err := os.Stat(p)
		if err != nil {
			return nil, &FileError{Path: p, Err: fmt.Errorf("terrain: %w", errors.Unwrap(err))}
		}
		if !st.IsDir() {
			files = append(files, p)
			continue
		}
		ents, err := os.ReadDir(p)
		if err != nil {
			return nil, &FileError{Path: p, Err: fmt.Errorf("terrain: %w", err)}
		}
		var found []string
		for _, e := range ents {
			if !e.IsDir() && formatOf(e.Name()) != "" {
				found = append(found, filepath.Join(p, e.Name()))
			}
		}
		if len(found) == 0 {
			return nil, &FileError{Path: p, Err: errors.New("terrain: directory holds no .tif, .tiff, .hgt or .asc file")}
		}
		sort.Strings(found)
		files = append(files, found...)
	}
	if len(files) == 0 {
		return nil, errors.New("terrain: no elevation file given")
	}
	var srcs []*fileSource
	for _, f := range files {
		s, err := openFile(f, opts)
		if err != nil {
			return nil, &FileError{Path: f, Err: err}
		}
		srcs = append(srcs, s)
	}
	if len(srcs) == 1 {
		return srcs[0], nil
	}
	return newMosaic(srcs, opts), nil
}

func formatOf(name string) string {
	switch strings.ToLower(filepath.Ext(name)) {
	case ".tif", ".tiff":
		return "geotiff"
	case ".hgt":
		return "hgt"
	case ".asc":
		return "asc"
	}
	return ""
}

// fileSource is one elevation file: its header and a window reader.
type fileSource struct {
	path   string
	hdr    *Grid // georeference, Elev nil
	fill   int
	window func(west, south, east, north float64) (*Grid, error)
}

func openFile(path string, opts OpenOptions) (*fileSource, error) {
	s := &fileSource{path: path, fill: opts.FillVoids}
	st, err := os.Stat(path)
	if err != nil {
		return nil, fmt.Errorf("terrain: %w", errors.Unwrap(err))
	}
	size := st.Size()
	switch formatOf(path) {
	case "hgt":
		s.hdr, err = ReadHGTInfo(path, size)
		s.window = func(w, so, e, n float64) (*Grid, error) {
			f, err := os.Open(path)
			if err != nil {
				return nil, err
			}
			defer f.Close()
			return ReadHGTWindow(f, size, path, w, so, e, n)
		}
	case "asc":
		crs := opts.CRS
		if crs.EPSG == 0 {
			crs, err = prjSidecar(path)
			if err != nil {
				return nil, err
			}
		}
		f, err := os.Open(path)
		if err != nil {
			return nil, fmt.Errorf("terrain: %w", err)
		}
		s.hdr, err = ReadASCInfo(f, crs)
		f.Close()
		if err != nil {
			return nil, err
		}
		s.hdr.Name = filepath.Base(path)
		s.window = func(w, so, e, n float64) (*Grid, error) {
			f, err := os.Open(path)
			if err != nil {
				return nil, err
			}
			defer f.Close()
			g, err := ReadASCWindow(f, crs, w, so, e, n)
			if g != nil {
				g.Name = filepath.Base(path)
			}
			return g, err
		}
	case "geotiff":
		err = openGeoTIFF(s, size)
	default:
		return nil, ErrUnknownFormat
	}
	if err != nil {
		return nil, err
	}
	return s, nil
}

// maxPRJ is the largest .prj sidecar read (bytes); a WKT CRS is a few KiB.
const maxPRJ = 64 << 10

// readLimited reads at most limit+1 bytes of the file at path, so a file
// larger than limit (or an endless stream such as a link to /dev/zero) is
// seen as too large without being read whole.
func readLimited(path string, limit int64) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return io.ReadAll(io.LimitReader(f, limit+1))
}

// prjSidecar reads the CRS from the .prj file beside an ASCII grid.
func prjSidecar(path string) (CRS, error) {
	base := strings.TrimSuffix(path, filepath.Ext(path))
	for _, ext := range []string{".prj", ".PRJ", ".Prj"} {
		b, err := readLimited(base+ext, maxPRJ)
		if err == nil {
			if len(b) > maxPRJ {
				return CRS{}, fmt.Errorf("terrain: %s is too large for a .prj", filepath.Base(base+ext))
			}
			crs, err := ParsePRJ(string(b))
			if err != nil {
				return CRS{}, fmt.Errorf("%s: %w", filepath.Base(base+ext), err)
			}
			return crs, nil
		}
	}
	return CRS{}, ErrNoCRS
}

func (s *fileSource) Extent() (west, south, east, north float64) { return s.hdr.Extent() }

func (s *fileSource) Resolution() float64 {
	e, n := s.hdr.CellSizeMetres()
	return math.Min(e, n)
}

func (s *fileSource) Window(west, south, east, north float64) (*Grid, error) {
	g, err := s.window(west, south, east, north)
	if err != nil {
		if errors.Is(err, ErrOutside) {
			return nil, err
		}
		return nil, &FileError{Path: s.path, Err: err}
	}
	if s.fill > 0 {
		FillVoids(g, s.fill)
	}
	return g, nil
}

func (s *fileSource) Describe() string {
	return fmt.Sprintf("%s %s (%d×%d, %s)", s.hdr.Format, filepath.Base(s.path), s.hdr.Cols, s.hdr.Rows, crsName(s.hdr.CRS))
}

// openGeoTIFF fills a fileSource for a GeoTIFF file from its header
// (ReadGeoTIFFInfo); windows are read with ReadGeoTIFFWindow, which takes
// the box in the raster's CRS units, so the longitude/latitude box is
// converted first and widened by one cell.
func openGeoTIFF(s *fileSource, size int64) error {
	f, err := os.Open(s.path)
	if err != nil {
		return fmt.Errorf("terrain: %w", err)
	}
	info, err := ReadGeoTIFFInfo(f, size)
	f.Close()
	if err != nil {
		return err
	}
	s.hdr = &Grid{CRS: info.CRS, Cols: info.Width, Rows: info.Height, X0: info.X0, Y0: info.Y0,
		DX: info.DX, DY: info.DY, Format: "GeoTIFF", Name: filepath.Base(s.path)}
	if err := checkHeader(s.hdr); err != nil {
		return err
	}
	s.window = func(w, so, e, n float64) (*Grid, error) {
		if _, _, _, _, ok := s.hdr.cellWindow(w, so, e, n); !ok {
			return nil, fmt.Errorf("%w: %s does not cover %.6g..%.6g E, %.6g..%.6g N", ErrOutside, s.hdr.Name, w, e, so, n)
		}
		xmin, ymin, xmax, ymax, _ := s.hdr.crsBox(w, so, e, n)
		f, err := os.Open(s.path)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		g, err := ReadGeoTIFFWindow(f, size, xmin-s.hdr.DX, ymin-s.hdr.DY, xmax+s.hdr.DX, ymax+s.hdr.DY)
		if err != nil {
			return nil, err
		}
		g.Name = s.hdr.Name
		if g.Format == "" {
			g.Format = "GeoTIFF"
		}
		return g, nil
	}
	return nil
}
