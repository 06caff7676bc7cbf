package reach

import (
	"context"
	"math"
	"testing"

	"github.com/paulmach/orb/planar"

	"glidereach/terrain"
)

// discTargets places fields at frame points (m) of g.
func discTargets(g *terrain.Local, elev, reserve float64, xy ...[2]float64) []Target {
	var ts []Target
	for _, p := range xy {
		lat, lon := g.Frame.Inverse(p[0], p[1])
		ts = append(ts, Target{Lat: lat, Lon: lon, Elev: elev, Reserve: reserve})
	}
	return ts
}

// lensArea is the area of the intersection of two discs of radius r whose
// centres are d apart (circle–circle intersection, analytic geometry,
// common practice, no source):
//
//	A = 2r²·acos(d/2r) − (d/2)·√(4r² − d²)
func lensArea(r, d float64) float64 {
	if d >= 2*r {
		return 0
	}
	return 2*r*r*math.Acos(d/(2*r)) - d/2*math.Sqrt(4*r*r-d*d)
}

func TestCoverageUnionOfDiscs(t *testing.T) {
	// Flat ground, still air, fields far apart: each field covers the disc
	// of radius r = (H − elev − reserve)·E (glide cone, tan γ = 1/E;
	// Anderson, Introduction to Flight), so the covered share of the window
	// is the union of the discs over the window's area, within 0.5 %.
	const E, elev, reserve, H = 10.0, 50.0, 300.0, 1350.0
	r := (H - elev - reserve) * E // 10 km
	g := flatWindow(-0.5, -24.5, 1001, 100, elev)
	ts := discTargets(g, elev, reserve, [2]float64{-25000, -25000}, [2]float64{25000, 0}, [2]float64{-12000, 26000})
	c, err := Coverage(context.Background(), g, ts, ConstantLoss(E), CoverageOptions{Alt: H, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	zone := float64(c.ZoneCells) * c.CellArea
	want := 3 * math.Pi * r * r / zone
	if math.Abs(c.CoveredFraction-want) > 0.005*want {
		t.Errorf("covered fraction %.5f, want %.5f (union of discs)", c.CoveredFraction, want)
	}
	for i := range ts {
		disc := math.Pi * r * r
		if math.Abs(c.Covers[i]-disc) > 0.005*disc || math.Abs(c.Exclusive[i]-disc) > 0.005*disc {
			t.Errorf("field %d covers %.4g m², alone %.4g m², want %.4g m² each", i, c.Covers[i], c.Exclusive[i], disc)
		}
	}
	// The covered polygons contour the same discs (common practice, no
	// source). Their area is within 1 %, not 0.5 %: simplifying a convex
	// ring to half a cell cuts chords inside it (about (2/3)·0.5 cell ×
	// perimeter, 0.6 % for a disc of 100 cells radius).
	cov, unc, ca, ua := c.Polygons()
	if len(cov) != 3 {
		t.Errorf("%d covered polygons, want 3", len(cov))
	}
	if math.Abs(ca-3*math.Pi*r*r) > 0.01*3*math.Pi*r*r {
		t.Errorf("covered polygons %.4g m², want %.4g m²", ca, 3*math.Pi*r*r)
	}
	if math.Abs(ca+ua-zone) > 0.01*zone {
		t.Errorf("covered %.4g + uncovered %.4g m² is not the window's %.4g m²", ca, ua, zone)
	}
	if len(unc) != 1 || len(unc[0]) != 4 {
		t.Errorf("uncovered area: %d polygons (first with %d rings), want one with 3 holes", len(unc), len(unc[0]))
	}
	for _, p := range cov {
		if planar.Area(p[0]) <= 0 {
			t.Error("covered exterior ring is not counter-clockwise (RFC 7946 §3.1.6)")
		}
	}
}

func TestCoverageExclusiveAndCandidates(t *testing.T) {
	// Two fields 12 km apart with discs of 10 km: each covers alone its disc
	// less the lens they share (circle–circle intersection, analytic
	// geometry, common practice, no source). Candidates add their disc
	// less what is covered already, and the greedy choice takes the
	// largest addition first.
	const E, elev, reserve, H = 10.0, 0.0, 300.0, 1300.0
	r := (H - elev - reserve) * E
	disc := math.Pi * r * r
	g := flatWindow(-0.5, -24.5, 1101, 100, elev)
	ts := discTargets(g, elev, reserve, [2]float64{-6000, 0}, [2]float64{6000, 0})
	c, err := Coverage(context.Background(), g, ts, ConstantLoss(E), CoverageOptions{Alt: H, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	lens := lensArea(r, 12000)
	for i := range ts {
		if want := disc - lens; math.Abs(c.Exclusive[i]-want) > 0.005*disc {
			t.Errorf("field %d alone covers %.4g m², want %.4g m²", i, c.Exclusive[i], want)
		}
	}
	if want := (2*disc - lens) / (float64(c.ZoneCells) * c.CellArea); math.Abs(c.CoveredFraction-want) > 0.005*want {
		t.Errorf("covered fraction %.5f, want %.5f", c.CoveredFraction, want)
	}
	cand := discTargets(g, elev, reserve, [2]float64{6000, 15000}, [2]float64{0, -30000}, [2]float64{-6000, 500})
	rk, err := c.Candidates(context.Background(), cand, ConstantLoss(E), 3)
	if err != nil {
		t.Fatal(err)
	}
	// Candidate 0 overlaps field 1 (centres 15 km apart) and a sliver of
	// field 0 (√(12²+15²) ≈ 19.2 km, also under 2r); candidate 1 is clear of
	// both; candidate 2 lies 0.5 km from field 0 and adds two thin crescents.
	gain0 := disc - lensArea(r, 15000) - lensArea(r, math.Hypot(12000, 15000))
	if math.Abs(rk.Gain[1]-disc) > 0.005*disc || math.Abs(rk.Gain[0]-gain0) > 0.01*disc {
		t.Errorf("gains %.4g, %.4g m², want %.4g, %.4g m²", rk.Gain[0], rk.Gain[1], gain0, disc)
	}
	if rk.Order[0] != 1 || rk.Order[1] != 0 || rk.Order[2] != 2 {
		t.Errorf("order %v, want [1 0 2]", rk.Order)
	}
	if len(rk.Steps) != 3 || rk.Steps[0].Candidate != 1 || rk.Steps[1].Candidate != 0 {
		t.Fatalf("greedy steps %+v, want candidates 1, 0, 2", rk.Steps)
	}
	for i := 1; i < len(rk.Steps); i++ {
		if rk.Steps[i].CoveredFraction < rk.Steps[i-1].CoveredFraction || rk.Steps[i].Added > rk.Steps[i-1].Added {
			t.Errorf("greedy steps do not add less and less: %+v", rk.Steps)
		}
	}
}

func TestCoverageAGLAndMask(t *testing.T) {
	// AGL on flat ground at elevation e is the same as MSL at e + AGL, and
	// a mask restricts what is counted (common practice, no source).
	const E = 10.0
	g := flatWindow(-0.5, -24.5, 401, 100, 200)
	ts := discTargets(g, 200, 300, [2]float64{0, 0})
	a, err := Coverage(context.Background(), g, ts, ConstantLoss(E), CoverageOptions{Alt: 1000, AGL: true, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Coverage(context.Background(), g, ts, ConstantLoss(E), CoverageOptions{Alt: 1200, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	if a.CoveredCells != b.CoveredCells {
		t.Errorf("AGL 1000 m covers %d cells, MSL 1200 m %d", a.CoveredCells, b.CoveredCells)
	}
	mask := make([]bool, g.Cols*g.Rows)
	for r := 0; r < g.Rows; r++ {
		for c := 200; c < g.Cols; c++ { // the east half
			mask[r*g.Cols+c] = true
		}
	}
	m, err := Coverage(context.Background(), g, ts, ConstantLoss(E), CoverageOptions{Alt: 1200, Clearance: 100, Mask: mask})
	if err != nil {
		t.Fatal(err)
	}
	if m.ZoneCells != 201*401 {
		t.Errorf("mask zone %d cells, want %d", m.ZoneCells, 201*401)
	}
	if half := float64(b.CoveredCells) / 2; math.Abs(float64(m.CoveredCells)-half) > 0.02*half {
		t.Errorf("east half covered %d cells, want about %.0f", m.CoveredCells, half)
	}
	if _, err := Coverage(context.Background(), g, ts, ConstantLoss(E), CoverageOptions{Alt: 1200, Mask: mask[:10]}); err == nil {
		t.Error("mask of the wrong size accepted")
	}
	far := discTargets(g, 0, 300, [2]float64{1e6, 0})
	if _, err := Coverage(context.Background(), g, far, ConstantLoss(E), CoverageOptions{Alt: 1200}); err != ErrNoTargets {
		t.Errorf("no field on the window: err %v, want ErrNoTargets", err)
	}
}

func TestCrop(t *testing.T) {
	// A crop is the same lattice: cell (c, r) of the crop is cell
	// (c0+c, r0+r) of the source (common practice, no source).
	g := hillyWindow(50, 30, 2)
	s := g.CropCells(5, 7, 20, 30)
	if s.Cols != 16 || s.Rows != 24 {
		t.Fatalf("crop %d×%d, want 16×24", s.Cols, s.Rows)
	}
	for _, rc := range [][2]int{{0, 0}, {15, 23}, {3, 9}} {
		x, y := s.XY(rc[0], rc[1])
		gx, gy := g.XY(rc[0]+5, rc[1]+7)
		if x != gx || y != gy || s.At(rc[0], rc[1]) != g.At(rc[0]+5, rc[1]+7) {
			t.Errorf("crop cell %v differs from the source", rc)
		}
	}
}

func TestCoverageFieldAboveTheAltitudeFlown(t *testing.T) {
	// A field on a plateau higher than the altitude flown covers nothing
	// (even over it the least altitude, its elevation plus the reserve, is
	// above); it is not an error, and a low field still covers its disc
	// of radius (H − elev − reserve)·E (glide cone, tan γ = 1/E; Anderson,
	// Introduction to Flight) within 0.5 %.
	// H + the 300 m margin the least altitudes are computed above it stays
	// below the plateau: the field there has no cell to compute.
	const E, H, reserve = 10.0, 1000.0, 300.0
	g := flatWindow(-0.5, -24.5, 601, 100, 0)
	l := *g
	l.Flat = false
	l.Elev = append([]float32(nil), g.Elev...)
	for r := 0; r < 60; r++ { // a 1500 m plateau in the south-west corner
		for c := 0; c < 60; c++ {
			l.Elev[r*l.Cols+c] = 1500
		}
	}
	hx, hy := l.XY(30, 30)
	ts := discTargets(&l, 0, reserve, [2]float64{0, 0})
	hlat, hlon := l.Frame.Inverse(hx, hy)
	ts = append(ts, Target{Lat: hlat, Lon: hlon, Elev: 1500, Reserve: reserve})
	c, err := Coverage(context.Background(), &l, ts, ConstantLoss(E), CoverageOptions{Alt: H, Clearance: 100})
	if err != nil {
		t.Fatal(err)
	}
	r := (H - reserve) * E
	if disc := math.Pi * r * r; math.Abs(c.Covers[0]-disc) > 0.005*disc {
		t.Errorf("low field covers %.4g m², want %.4g m²", c.Covers[0], disc)
	}
	if c.Covers[1] != 0 || c.Skipped[1] {
		t.Errorf("plateau field: covers %.4g m², skipped %v; want 0, not skipped", c.Covers[1], c.Skipped[1])
	}
}
