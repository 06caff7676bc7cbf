package terrain

import (
	"errors"
	"os"
	"testing"
)

// A mosaic reads only the tiles that cover a window: after one tile's file
// is removed, windows elsewhere still work and a window over it names it.
func TestMosaicReadsOnlyCoveringTiles(t *testing.T) {
	dir := t.TempDir()
	a := makeHGT(t, dir, -1, -25, 1201)
	b := makeHGT(t, dir, -1, -24, 1201)
	src, err := Open(a, b)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Remove(b); err != nil {
		t.Fatal(err)
	}
	g, err := src.Window(-24.8, -0.8, -24.6, -0.6)
	if err != nil {
		t.Fatalf("window inside the remaining tile: %v", err)
	}
	if g.Name != "S01W025.hgt" {
		t.Errorf("window read from %q", g.Name)
	}
	_, err = src.Window(-23.8, -0.8, -23.6, -0.6)
	var fe *FileError
	if !errors.As(err, &fe) || fe.Path != b {
		t.Errorf("window over the removed tile: %v", err)
	}
	if _, err := src.Window(10, 10, 11, 11); !errors.Is(err, ErrOutside) {
		t.Errorf("window off the mosaic: %v", err)
	}
}
