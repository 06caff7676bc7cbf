package reach

import (
	"context"
	"math"
	"testing"

	"glidereach/terrain"
)

// TestArrivalAtFieldWalksFinalSegment: a field's arrival comes from a final
// segment to the field from a cell beside it or from that cell's
// line-of-sight parent. The parent's line to the cell was walked by the
// solver, the line to the field was not, and the two can lie on either side
// of a feature one cell thick. Here the start is 8 cells south of the field
// and a wall (or a void) one cell wide runs north toward the field just east
// of the line to the cell below it: the straight line from the start to the
// field crosses the wall, the line to the cell beside the field does not.
// The arrival must be no higher than the shortest glide that goes around the
// wall's end (flat still air: height lost = ground distance / E, Anderson,
// Introduction to Flight, gliding flight; the shortest way around a
// rectangle is over its corner: common practice, no source), and within 5 %
// of its height lost (the search is near-optimal: the band of the property
// tests, DEVELOPERS.md "Optimality").
func TestArrivalAtFieldWalksFinalSegment(t *testing.T) {
	const E, H, cell = 10.0, 1000.0, 100.0
	const cols, rows = 60, 20
	const sx, sy = 40.0, 2.0    // start (cell units)
	const fx, fy = 40.95, 10.95 // field
	for _, tc := range []struct {
		name string
		wall float32
	}{
		{"wall", 2000},
		{"void", float32(math.NaN())},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := terrain.NewFrame(-0.5, -24.5)
			g := terrain.NewFlat(f, 0, 0, cell, cols, rows, 0)
			for r := 4; r <= 9; r++ {
				g.Elev[r*cols+41] = tc.wall // squares x ∈ [40.5, 41.5], y ∈ [3.5, 9.5]
			}
			lat, lon := f.Inverse(sx*cell, sy*cell)
			res, err := Footprint(context.Background(), g, Start{Lat: lat, Lon: lon, Alt: H}, ConstantLoss(E), FootprintOptions{Reserve: 100, Clearance: 100})
			if err != nil {
				t.Fatal(err)
			}
			flat, flon := f.Inverse(fx*cell, fy*cell)
			got, ok := res.ArrivalAtField(flat, flon, 0)
			if !ok {
				t.Fatal("no arrival at the field")
			}
			straight := H - math.Hypot(fx-sx, fy-sy)*cell/E
			around := math.Hypot(40.5-sx, 9.5-sy) + math.Hypot(fx-40.5, fy-9.5)
			want := H - around*cell/E
			t.Logf("arrival %.3f m; around the wall's end %.3f m; straight through it %.3f m", got, want, straight)
			if got > want+1e-6 {
				t.Errorf("arrival %.3f m is above the best glide around the wall (%.3f m); the straight line through it gives %.3f m", got, want, straight)
			}
			if lost, best := H-got, H-want; lost > best*1.05 {
				t.Errorf("height lost %.2f m, more than 5 %% above the best %.2f m", lost, best)
			}
		})
	}
}
