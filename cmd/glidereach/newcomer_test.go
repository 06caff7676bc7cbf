package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestFarFromFieldsWarns checks that a start, route or area far from every
// field (here: latitude and longitude swapped; from -24.5,-0.5 to the demo
// fields near -0.5,-24.5 the spherical law of cosines gives about 3700 km,
// about 3690 km to the nearest) or outside the terrain given draws a
// warning on standard error naming the distance and the LAT,LON order, and
// that a plan near its fields draws none.
func TestFarFromFieldsWarns(t *testing.T) {
	td := filepath.Join("..", "..", "testdata")
	fields := filepath.Join(td, "fields", "demo-fields.geojson")
	cases := []struct {
		args []string
		want string // "" for no warning
	}{
		{[]string{"reach", "--from", "-24.5,-0.5", "--alt", "1500m", "--fields", fields}, "the start lies 36"},
		{[]string{"reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--fields", fields}, ""},
		{[]string{"coverage", "--fields", fields, "--box", "-24.85,-0.8,-24.15,-0.15", "--alt", "1500m"}, "the box lies 36"},
		{[]string{"coverage", "--fields", fields, "--box", "-0.8,-24.85,-0.15,-24.15", "--alt", "1500m"}, ""},
		{[]string{"route", "--route", filepath.Join(td, "routes", "demo-route.gpx"), "--fields", filepath.Join(td, "fields", "fixture-fields.geojson"), "--alt", "2000m",
			"--terrain", filepath.Join(td, "geotiff", "geo_int16_strip_none.tif")}, "outside the terrain given"},
	}
	for _, c := range cases {
		_, _, stderr := runCLI(t, c.args...)
		if c.want == "" {
			if strings.Contains(stderr, "warning: the") {
				t.Errorf("%q: unexpected warning:\n%s", c.args, stderr)
			}
			continue
		}
		if !strings.Contains(stderr, c.want) || !strings.Contains(stderr, "LAT,LON (latitude first)") {
			t.Errorf("%q: stderr lacks %q and the LAT,LON hint:\n%s", c.args, c.want, stderr)
		}
	}
}
