package main

// Blank imports that pin the module's chosen dependencies in go.mod while the
// packages that use them are being written. Remove an entry once a real import
// of that package exists elsewhere.
import (
	_ "github.com/paulmach/orb"
	_ "github.com/paulmach/orb/geojson"
	_ "github.com/paulmach/orb/simplify"
	_ "github.com/schollz/progressbar/v3"
	_ "go.yaml.in/yaml/v3"
	_ "golang.org/x/image/font/gofont/goregular"
	_ "golang.org/x/image/font/opentype"
	_ "golang.org/x/image/tiff/lzw"
	_ "golang.org/x/image/vector"
	_ "golang.org/x/term"
	_ "gonum.org/v1/gonum/optimize"
)
