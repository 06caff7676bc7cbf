package main

import (
	"strings"
	"testing"

	"glidereach/terrain"
)

// FuzzCRSFlag: any --crs text is refused with a usage error or opens the
// ASCII grid in a CRS the terrain package handles; never a panic.
func FuzzCRSFlag(f *testing.F) {
	for _, s := range []string{"EPSG:4326", "epsg:32633", "32727", "EPSG:25832", "EPSG:3857", "EPSG:", "EPSG:-1", "EPSG:99999999999999999999", " EPSG:4326 ", "WGS84", "EPSG:4326x"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 100 {
			return
		}
		tf := newTerrainFlags()
		tf.paths, tf.crs = []string{"../../testdata/asc/noprj.asc"}, s
		src, err := tf.open()
		if err != nil {
			if exitStatus(err) != exitUsage {
				t.Fatalf("--crs %q: %v is not a usage error", s, err)
			}
			return
		}
		if src == nil {
			t.Fatalf("--crs %q: no source and no error", s)
		}
		// The same text through the terrain command's parser agrees.
		if c, err := parseEPSG(s); err == nil {
			if terrain.CheckCRS(c) != nil {
				t.Fatalf("parseEPSG(%q) = %v, refused by CheckCRS", s, c)
			}
		}
	})
}

// FuzzLevels: --levels values are at most maxLevels heights within
// 0..5000 m, or a usage error naming --levels.
func FuzzLevels(f *testing.F) {
	for _, s := range []string{"0m,150m", "500ft", "", "1e9m", "-1m", "nan", "0m,1m,2m,3m,4m,5m,6m,7m,8m,9m,10m,11m,12m,13m,14m,15m,16m,17m,18m,19m,20m", "5km", "3000", "1,,2"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 2000 {
			return
		}
		var levels []string
		if s != "" {
			levels = strings.Split(s, ",")
		}
		vs, err := parseLevels(levels)
		if err != nil {
			if exitStatus(err) != exitUsage || !strings.Contains(err.Error(), "--levels") {
				t.Fatalf("%q: %v", s, err)
			}
			return
		}
		if len(vs) > maxLevels {
			t.Fatalf("%q: %d levels", s, len(vs))
		}
		for _, v := range vs {
			if !(v >= 0 && v <= 5000) {
				t.Fatalf("%q: level %v", s, v)
			}
		}
	})
}
