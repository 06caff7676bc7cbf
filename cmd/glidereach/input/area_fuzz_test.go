package input

import (
	"math"
	"os"
	"testing"
)

// FuzzParseArea fuzzes both forms of the area value: a box text
// ("LAT,LON,LAT,LON", as --box takes it) and the bytes of a GeoJSON area file. It
// never panics; an accepted area has a bound in range, and its indexed
// Contains agrees with the plain even-odd test at points across the bound.
func FuzzParseArea(f *testing.F) {
	if b, err := os.ReadFile(demoArea); err == nil {
		f.Add(string(b))
	}
	f.Add("-0.8,-24.8,-0.2,-24.2")
	f.Add("-1.5e1, 1e2 ,80,120")
	f.Add(`{"type":"MultiPolygon","coordinates":[[[[0,0],[1,0],[1,1],[0,1],[0,0]]],[[[2,0],[3,0],[3,1],[2,1],[2,0]]]]}`)
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 1<<16 {
			return
		}
		var a *Region
		var err error
		if looksLikeBox(s) {
			a, err = parseBox(s)
		} else {
			a, err = ParseAreaGeoJSON([]byte(s))
		}
		if err != nil {
			return
		}
		b := a.Bounds()
		if !(b.Min[0] >= -180 && b.Max[0] <= 180 && b.Min[1] >= -90 && b.Max[1] <= 90 && b.Min[0] <= b.Max[0] && b.Min[1] <= b.Max[1]) {
			t.Fatalf("bound %v", b)
		}
		for i := 0; i <= 8; i++ {
			for j := 0; j <= 8; j++ {
				lon := b.Min[0] + (b.Max[0]-b.Min[0])*(float64(i)+0.37)/8
				lat := b.Min[1] + (b.Max[1]-b.Min[1])*(float64(j)+0.61)/8
				got := a.Contains(lat, lon)
				want := false
				for _, p := range a.Polygons {
					if polygonContains(p, lon, lat) {
						want = true
						break
					}
				}
				if a.box {
					want = lon >= b.Min[0] && lon <= b.Max[0] && lat >= b.Min[1] && lat <= b.Max[1]
				}
				if got != want && !math.IsNaN(lat) {
					t.Fatalf("Contains(%v, %v) = %v, even-odd test %v", lat, lon, got, want)
				}
			}
		}
	})
}
