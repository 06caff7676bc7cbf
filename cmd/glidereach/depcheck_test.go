package main

import (
	"os/exec"
	"strings"
	"testing"
)

// TestDependencyDirection keeps the layering of DESIGN.md: cmd → reach/plan
// (the use cases) → reach → {terrain, wind}; terrain and wind import
// neither each other nor reach, reach does not import the use cases above
// it, and no library package imports cobra or pflag (the command line) or
// the input edge.
func TestDependencyDirection(t *testing.T) {
	if _, err := exec.LookPath("go"); err != nil {
		t.Skip("go tool not on PATH")
	}
	forbidden := map[string][]string{
		"glidereach/terrain":         {"glidereach/wind", "glidereach/reach", "glidereach/reach/", "glidereach/cmd/", "github.com/spf13/cobra"},
		"glidereach/wind":            {"glidereach/terrain", "glidereach/reach", "glidereach/reach/", "glidereach/cmd/", "github.com/spf13/cobra"},
		"glidereach/reach":           {"glidereach/cmd/", "github.com/spf13/cobra", "github.com/tidwall/geojson", "glidereach/reach/plan"},
		"glidereach/reach/plan":      {"glidereach/cmd/", "github.com/spf13/cobra", "github.com/spf13/pflag", "github.com/tidwall/geojson"},
		"glidereach/reach/plan/demo": {"glidereach/cmd/", "github.com/spf13/cobra", "github.com/spf13/pflag", "github.com/tidwall/geojson"},
		"glidereach/reach/geodesy":   {"glidereach/cmd/", "github.com/spf13/cobra", "glidereach/terrain", "glidereach/wind"},
	}
	for pkg, bad := range forbidden {
		out, err := exec.Command("go", "list", "-deps", pkg).Output()
		if err != nil {
			t.Fatalf("go list -deps %s: %v", pkg, err)
		}
		for _, dep := range strings.Fields(string(out)) {
			for _, b := range bad {
				if dep == b || strings.HasPrefix(dep, b) && strings.HasSuffix(b, "/") {
					t.Errorf("%s imports %s", pkg, dep)
				}
			}
		}
	}
}
