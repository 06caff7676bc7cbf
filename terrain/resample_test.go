package terrain

import (
	"math"
	"testing"
)

// TestResampleLatticeError measures the position error of interpolating the
// frame inverse every 16 cells instead of projecting every cell: it must stay
// below a metre (the design limit); it is in fact a few millimetres at most.
func TestResampleLatticeError(t *testing.T) {
	cases := []struct {
		name       string
		g          *Grid
		cell       float64
		cols, rows int
	}{
		{"geographic 30 m, 60 km", Synthetic(1, 16, 16, 1.0/3600), 30, 2000, 2000},
		{"geographic 100 m, 400 km", Synthetic(1, 16, 16, 1.0/3600), 100, 4000, 4000},
		{"UTM 27S 30 m", &Grid{CRS: CRS{EPSG: 32727}, Cols: 16, Rows: 16, X0: 110000, Y0: 9945000, DX: 30, DY: 30}, 30, 2000, 2000},
	}
	limits := []float64{0.001, 0.01, 0.001}
	for ci, c := range cases {
		f := NewFrame(SyntheticLat, SyntheticLon)
		x0 := -float64(c.cols) / 2 * c.cell
		y0 := -float64(c.rows) / 2 * c.cell
		dxm, dym := c.g.CellSizeMetres()
		worst := 0.0
		const B = resampleBlock
		for r := 0; r < c.rows; r += 7 {
			for col := 0; col < c.cols; col += 5 {
				i, j := col/B, r/B
				tx, ty := float64(col%B)/B, float64(r%B)/B
				p := func(i, j int) (float64, float64) {
					return c.g.frameToCell(f, x0+float64(i*B)*c.cell, y0+float64(j*B)*c.cell)
				}
				a0, a1 := p(i, j)
				b0, b1 := p(i+1, j)
				d0, d1 := p(i, j+1)
				e0, e1 := p(i+1, j+1)
				ic := (a0*(1-tx)+b0*tx)*(1-ty) + (d0*(1-tx)+e0*tx)*ty
				ir := (a1*(1-tx)+b1*tx)*(1-ty) + (d1*(1-tx)+e1*tx)*ty
				xc, xr := c.g.frameToCell(f, x0+float64(col)*c.cell, y0+float64(r)*c.cell)
				worst = math.Max(worst, math.Hypot((ic-xc)*dxm, (ir-xr)*dym))
			}
		}
		t.Logf("%s: worst interpolation error %.3g m", c.name, worst)
		if worst > limits[ci] {
			t.Errorf("%s: interpolation error %.3g m exceeds %g m", c.name, worst, limits[ci])
		}
	}
}

func TestResampleMatchesElevation(t *testing.T) {
	g := Synthetic(3, 400, 400, 1.0/3600)
	g.Elev[200*400+200] = float32(math.NaN())
	f := NewFrame(SyntheticLat, SyntheticLon)
	const cell = 25.0
	cols, rows := 300, 260
	x0, y0 := -3000.0, -4000.0
	l := Resample(g, f, x0, y0, cell, cols, rows)
	if l.Cols != cols || l.Rows != rows || len(l.Elev) != cols*rows || l.Flat {
		t.Fatalf("local %d×%d", l.Cols, l.Rows)
	}
	worst := 0.0
	nanMismatch := 0
	for r := 0; r < rows; r += 3 {
		for c := 0; c < cols; c += 3 {
			x, y := l.XY(c, r)
			lat, lon := f.Inverse(x, y)
			want, ok := g.Elevation(lat, lon)
			got := l.At(c, r)
			if !ok {
				if !math.IsNaN(got) {
					nanMismatch++
				}
				continue
			}
			if math.IsNaN(got) {
				nanMismatch++
				continue
			}
			worst = math.Max(worst, math.Abs(got-want))
		}
	}
	// Sub-millimetre positions on slopes of at most a few tens of percent
	// give centimetre elevation differences at most.
	if worst > 0.05 || nanMismatch > 0 {
		t.Errorf("worst difference %.3g m, %d void mismatches", worst, nanMismatch)
	}
	// Row 0 is south: the south-west cell centre is (x0, y0).
	lat0, _ := f.Inverse(l.XY(0, 0))
	lat1, _ := f.Inverse(l.XY(0, rows-1))
	if !(lat0 < lat1) {
		t.Error("row 0 is not south")
	}
	// Cells off the grid are NaN.
	far := Resample(g, f, 1e5, 1e5, cell, 10, 10)
	for _, v := range far.Elev {
		if v == v {
			t.Fatal("cell off the grid has a value")
		}
	}
}

func TestResampleSource(t *testing.T) {
	dir := t.TempDir()
	makeHGT(t, dir, -1, -25, 1201)
	src, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	f := NewFrame(-0.5, -24.5)
	l, err := ResampleSource(src, f, -5000, -5000, 90, 112, 112)
	if err != nil {
		t.Fatal(err)
	}
	lat, lon := f.Inverse(l.XY(50, 60))
	g, err := src.Window(-24.6, -0.6, -24.4, -0.4)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := g.Elevation(lat, lon)
	if math.Abs(l.At(50, 60)-want) > 0.01 {
		t.Errorf("resampled %v, direct %v", l.At(50, 60), want)
	}
	if _, err := ResampleSource(src, f, 1e6, 1e6, 90, 10, 10); err == nil {
		t.Error("Local far off the data: no error")
	}
}

func benchmarkResample(b *testing.B, n int, resample func(*Grid, Frame, float64, float64, float64, int, int) *Local) {
	g := Synthetic(1, n, n, 1.0/3600)
	f := NewFrame(SyntheticLat, SyntheticLon)
	cell := 30.0
	x0 := -float64(n) / 2 * cell
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		resample(g, f, x0, x0, cell, n, n)
	}
}

// BenchmarkResample2000 resamples a 2000×2000 Local from a 2000² grid.
func BenchmarkResample2000(b *testing.B) { benchmarkResample(b, 2000, Resample) }

// BenchmarkResampleHigh2000 is the same for ResampleHigh (the highest
// sample of each cell's footprint: the solvers' ground), on one core with
// -cpu 1 for the rows are split between two goroutines.
func BenchmarkResampleHigh2000(b *testing.B) { benchmarkResample(b, 2000, ResampleHigh) }
