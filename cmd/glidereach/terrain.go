package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"glidereach/reach/plan"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/terrain"
)

func init() { register(newTerrainCmd) }

// terrainReport is what `glidereach terrain` prints; the JSON keys are part
// of the command-line contract (DESIGN.md: elevation_m for --at).
type terrainReport struct {
	Source        string        `json:"source"`
	Format        string        `json:"format"`
	Files         []string      `json:"files"`
	Cols          int           `json:"cols"`
	Rows          int           `json:"rows"`
	CRS           string        `json:"crs"`
	CRSName       string        `json:"crs_name"`
	Extent        terrainExtent `json:"extent"`
	CellX         float64       `json:"cell_size_x"`
	CellY         float64       `json:"cell_size_y"`
	CellUnit      string        `json:"cell_unit"` // "deg" or "m"
	CellEastM     float64       `json:"cell_size_east_m"`
	CellNorthM    float64       `json:"cell_size_north_m"`
	ResolutionM   float64       `json:"resolution_m"`
	MinM          *float64      `json:"elevation_min_m"`
	MaxM          *float64      `json:"elevation_max_m"`
	Voids         int           `json:"voids"`
	VoidsFilled   int           `json:"voids_filled"`
	VoidTreatment string        `json:"void_treatment"`
	Warnings      []string      `json:"warnings"`
	At            *terrainAt    `json:"at,omitempty"`
	ElevationM    *float64      `json:"elevation_m"` // null without --at and at a void
	Caution       string        `json:"caution"`
}

type terrainExtent struct {
	West  float64 `json:"west_deg"`
	South float64 `json:"south_deg"`
	East  float64 `json:"east_deg"`
	North float64 `json:"north_deg"`
}

type terrainAt struct {
	Lat  float64 `json:"lat_deg"`
	Lon  float64 `json:"lon_deg"`
	Void bool    `json:"void"`
}

func newTerrainCmd() *cobra.Command {
	var (
		format, crsText, voids string
		fillMax                int
		at                     input.LatLon
	)
	cmd := &cobra.Command{
		Use:   "terrain FILE|DIR... [flags]",
		Short: "Summarise elevation data and sample it at a point",
		Long: `terrain reads elevation files — GeoTIFF (.tif, .tiff), SRTM tiles (.hgt) and
ESRI ASCII grids (.asc) — or directories of them, and prints what the other
commands will see: format, size, coordinate reference system, extent,
resolution, elevation range and voids (cells without data). Several files are
joined into one mosaic. --at prints the elevation at a point, interpolated
bilinearly between the four surrounding samples.

Voids are obstacles by default: a glide is never planned over unknown ground.
--voids fill fills small voids (up to --fill-max cells each) by interpolation
and reports how many cells it filled; larger voids stay obstacles.

An ESRI ASCII grid needs its CRS: from a .prj file beside it, or --crs. The
tool does not guess from the numbers.

` + cautionText,
		Example: `  glidereach terrain testdata/geotiff/utm32626_int16_tiled_deflate.tif
  glidereach terrain testdata/asc/geo_corner.asc --at -0.1,-24.2
  glidereach terrain testdata/geotiff/geo_int16_strip_none.tif testdata/geotiff/geo_float32_strip_packbits.tif --format json
  glidereach terrain testdata/asc/noprj.asc --crs EPSG:4326 --voids fill`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if format != "text" && format != "json" {
				return input.Usagef("--format", "%q: want text or json", format)
			}
			var opts terrain.OpenOptions
			if crsText != "" {
				c, err := parseEPSG(crsText)
				if err != nil {
					return &input.UsageError{Where: "--crs", Err: err}
				}
				opts.CRS = c
			}
			fill := 0
			switch voids {
			case "obstacle":
			case "fill":
				if fillMax < 1 || fillMax > maxFillCells {
					return input.Usagef("--fill-max", "%d is outside 1..%d cells", fillMax, maxFillCells)
				}
				fill = fillMax
			default:
				return input.Usagef("--voids", "%q: want obstacle or fill", voids)
			}
			rep, err := terrainSummary(opts, fill, args, &at)
			if err != nil {
				return err
			}
			return writeTerrainReport(cmd.OutOrStdout(), rep, format)
		},
	}
	f := cmd.Flags()
	f.Var(&at, "at", "print the elevation at LAT,LON (decimal degrees)")
	f.StringVar(&format, "format", "text", "output format: text or json")
	f.StringVar(&crsText, "crs", "", "CRS of ESRI ASCII grids, e.g. EPSG:4326 or EPSG:32633 (overrides a .prj)")
	f.StringVar(&voids, "voids", "obstacle", "voids (no-data cells): obstacle, or fill small ones by interpolation")
	f.IntVar(&fillMax, "fill-max", 64, fmt.Sprintf("with --voids fill: largest void filled, in cells; range 1..%d", maxFillCells))
	_ = cmd.RegisterFlagCompletionFunc("format", cobra.FixedCompletions([]string{"text", "json"}, cobra.ShellCompDirectiveNoFileComp))
	_ = cmd.RegisterFlagCompletionFunc("voids", cobra.FixedCompletions([]string{"obstacle", "fill"}, cobra.ShellCompDirectiveNoFileComp))
	return cmd
}

// maxFillCells bounds --fill-max: interpolating across a larger void would
// invent ground over a sizeable area (a 4096-cell void is 1.8 km across at
// 30 m cells), where an obstacle is the conservative reading.
const maxFillCells = 4096

// parseEPSG parses "EPSG:n" (or a bare n) and checks that the terrain
// package handles the CRS.
func parseEPSG(s string) (terrain.CRS, error) {
	t := strings.TrimSpace(s)
	if len(t) > 5 && strings.EqualFold(t[:5], "EPSG:") {
		t = t[5:]
	}
	n, err := strconv.Atoi(t)
	if err != nil || n <= 0 {
		return terrain.CRS{}, fmt.Errorf("%q is not an EPSG code (e.g. EPSG:4326)", s)
	}
	c := terrain.CRS{EPSG: n}
	if err := terrain.CheckCRS(c); err != nil {
		return terrain.CRS{}, err
	}
	return c, nil
}

// fileUsage turns a terrain error about a file into a usage error naming it.
func fileUsage(err error, fallback string) error {
	var fe *terrain.FileError
	if errors.As(err, &fe) {
		if errors.Is(fe.Err, terrain.ErrNoCRS) {
			return &input.UsageError{Where: fe.Path, Err: fmt.Errorf("%w; pass it with --crs", fe.Err)}
		}
		return &input.UsageError{Where: fe.Path, Err: fe.Err}
	}
	return &input.UsageError{Where: fallback, Err: err}
}

func terrainSummary(opts terrain.OpenOptions, fill int, paths []string, at *input.LatLon) (*terrainReport, error) {
	src, err := terrain.OpenWith(opts, paths...)
	if err != nil {
		return nil, fileUsage(err, strings.Join(paths, ","))
	}
	w, s, e, n := src.Extent()
	g, err := src.Window(w, s, e, n)
	if err != nil {
		return nil, fileUsage(err, strings.Join(paths, ","))
	}
	rep := &terrainReport{
		Source: src.Describe(), Format: g.Format, Files: paths,
		Cols: g.Cols, Rows: g.Rows,
		CRS: fmt.Sprintf("EPSG:%d", g.CRS.EPSG), CRSName: crsLabel(g.CRS),
		Extent: terrainExtent{w, s, e, n},
		CellX:  g.DX, CellY: g.DY, CellUnit: "m",
		ResolutionM:   src.Resolution(),
		Caution:       cautionText,
		VoidTreatment: "obstacle",
	}
	if g.Format == "mosaic" {
		rep.Format = "mosaic (see source)"
	}
	if g.CRS.EPSG == 4326 {
		rep.CellUnit = "deg"
	}
	rep.CellEastM, rep.CellNorthM = g.CellSizeMetres()
	if fill > 0 {
		rep.VoidsFilled = terrain.FillVoids(g, fill)
		rep.VoidTreatment = fmt.Sprintf("filled where at most %d cells, the rest obstacles", fill)
	}
	rep.Voids = g.Voids()
	rep.Warnings = []string{}
	if lo, hi, ok := g.ElevationRange(); ok && !math.IsInf(lo, 0) && !math.IsInf(hi, 0) {
		rep.MinM, rep.MaxM = &lo, &hi
		if w := plan.ImplausibleElevations(lo, hi); w != "" {
			rep.Warnings = append(rep.Warnings, w)
		}
	}
	if at.Given {
		rep.At = &terrainAt{Lat: at.Lat, Lon: at.Lon}
		if at.Lon < w || at.Lon > e || at.Lat < s || at.Lat > n {
			return nil, input.Usagef("--at", "%s is outside the terrain (%.5f..%.5f E, %.5f..%.5f N)", at.String(), w, e, s, n)
		}
		if v, ok := g.Elevation(at.Lat, at.Lon); ok {
			rep.ElevationM = &v
		} else if plan.Inside(g, at.Lat, at.Lon) {
			rep.At.Void = true
		} else {
			return nil, input.Usagef("--at", "%s is outside the terrain's cells (though inside its lon/lat extent, a box wider than a projected grid's outline)", at.String())
		}
	}
	return rep, nil
}

func crsLabel(c terrain.CRS) string {
	if c.EPSG == 4326 {
		return "WGS84 geographic (lon/lat degrees)"
	}
	if zone, south, ok := terrain.UTMZone(c.EPSG); ok {
		h, datum := "N", "WGS84"
		if south {
			h = "S"
		}
		if c.EPSG < 30000 {
			datum = "ETRS89"
		}
		return fmt.Sprintf("%s UTM zone %d%s", datum, zone, h)
	}
	return "unknown"
}

// roundTerrainJSON rounds the report's metre figures for JSON: the
// interpolated elevation at --at to 0.1 m (a bilinear value printed to 13
// digits, 293.7300000000067, claims a precision no DEM has), the stored
// extremes to 1 mm (a float32 sample's own precision at these heights, and
// what gdalinfo prints) and cell sizes to 1 cm. Degrees stay as the file
// gives them.
func roundTerrainJSON(r *terrainReport) *terrainReport {
	c := *r
	r1 := func(v float64) float64 { return math.Round(v*10) / 10 }
	r2 := func(v float64) float64 { return math.Round(v*100) / 100 }
	r3 := func(v float64) float64 { return math.Round(v*1000) / 1000 }
	ptr := func(v *float64, round func(float64) float64) *float64 {
		if v == nil {
			return nil
		}
		x := round(*v)
		return &x
	}
	c.CellEastM, c.CellNorthM, c.ResolutionM = r2(c.CellEastM), r2(c.CellNorthM), r2(c.ResolutionM)
	if c.CellUnit == "m" {
		c.CellX, c.CellY = r2(c.CellX), r2(c.CellY)
	}
	c.MinM, c.MaxM, c.ElevationM = ptr(c.MinM, r3), ptr(c.MaxM, r3), ptr(c.ElevationM, r1)
	return &c
}

func writeTerrainReport(w io.Writer, r *terrainReport, format string) error {
	if format == "json" {
		r = roundTerrainJSON(r)
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(r)
	}
	var b strings.Builder
	fmt.Fprintf(&b, "source:      %s\n", r.Source)
	fmt.Fprintf(&b, "format:      %s\n", r.Format)
	fmt.Fprintf(&b, "size:        %d × %d cells\n", r.Cols, r.Rows)
	fmt.Fprintf(&b, "crs:         %s (%s)\n", r.CRS, r.CRSName)
	fmt.Fprintf(&b, "extent:      %.6f..%.6f E, %.6f..%.6f N\n", r.Extent.West, r.Extent.East, r.Extent.South, r.Extent.North)
	if r.CellUnit == "deg" {
		fmt.Fprintf(&b, "cell:        %.4g″ × %.4g″ (%.1f m east × %.1f m north at mid-latitude)\n", r.CellX*3600, r.CellY*3600, r.CellEastM, r.CellNorthM)
	} else {
		fmt.Fprintf(&b, "cell:        %.4g m × %.4g m\n", r.CellX, r.CellY)
	}
	fmt.Fprintf(&b, "resolution:  %.1f m\n", r.ResolutionM)
	if r.MinM != nil {
		fmt.Fprintf(&b, "elevation:   %.1f m to %.1f m MSL\n", *r.MinM, *r.MaxM)
	} else {
		fmt.Fprintf(&b, "elevation:   no data (every cell is a void)\n")
	}
	for _, w := range r.Warnings {
		fmt.Fprintf(&b, "warning:     %s\n", w)
	}
	pct := 100 * float64(r.Voids) / math.Max(1, float64(r.Cols*r.Rows))
	if r.VoidsFilled > 0 || r.VoidTreatment != "obstacle" {
		fmt.Fprintf(&b, "voids:       %d cells (%.3g %%) after filling %d cells; %s\n", r.Voids, pct, r.VoidsFilled, r.VoidTreatment)
	} else {
		fmt.Fprintf(&b, "voids:       %d cells (%.3g %%), treated as obstacles\n", r.Voids, pct)
	}
	if r.At != nil {
		if r.ElevationM != nil {
			fmt.Fprintf(&b, "at %.6f, %.6f: %.1f m MSL (bilinear)\n", r.At.Lat, r.At.Lon, *r.ElevationM)
		} else {
			fmt.Fprintf(&b, "at %.6f, %.6f: void (no data; an obstacle)\n", r.At.Lat, r.At.Lon)
		}
	}
	fmt.Fprintf(&b, "\n%s\n", r.Caution)
	_, err := io.WriteString(w, b.String())
	return err
}
