package tiling

import (
	"context"
	"testing"
)

// The work files are parsed back on a resume, and the tile parts by a
// distributed engine's merge step: a damaged or hostile input must give an
// error, never a panic or an inconsistent result. One fuzz target per
// decoder; each is seeded with valid encodings of every kind.
func fuzzSeeds(f *testing.F) {
	sc := newScene(f, 64)
	p := sc.plan(f, 16, 700)
	res, err := Run(context.Background(), sc.src, p, RunOptions{WorkDir: f.TempDir(), Workers: 1})
	if err != nil {
		f.Fatal(err)
	}
	tr, err := res.Tile(p.Tiles()[0])
	if err != nil {
		f.Fatal(err)
	}
	b, _ := tr.Encode()
	f.Add(b)
	f.Add(b[:len(b)/2])
	pb, _ := p.Encode()
	f.Add(pb)
	fb, _ := fullPlan().Encode()
	f.Add(fb)
	rb, _ := fullTileResult().Encode()
	f.Add(rb)
	tp, _ := (&TilePart{Tile: TileID{1, 2}, Field: 1, W: 2, H: 1, Least: []float32{1, 2}}).Encode()
	f.Add(tp)
}

func FuzzDecodeTileResult(f *testing.F) {
	fuzzSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		tr, err := DecodeTileResult(data)
		if err != nil && !isCorrupt(err) {
			t.Errorf("not an ErrCorrupt with CorruptMarker: %v", err)
		}
		if err == nil {
			// Consistent: every array indexable by the tile's cells.
			n := tr.Cols * tr.Rows
			_ = tr.Least[n-1]
			_ = tr.Best[n-1]
			_ = tr.Count[n-1]
			_ = tr.CellArea(tr.Cols-1, tr.Rows-1)
			_ = tr.InZone(n - 1)
			if b, _ := tr.Encode(); string(b) != string(data) {
				t.Error("a decoded tile result encodes to other bytes")
			}
		}
	})
}

func FuzzDecodePlan(f *testing.F) {
	fuzzSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		p, err := DecodePlan(data)
		if err != nil && !isCorrupt(err) {
			t.Errorf("not an ErrCorrupt with CorruptMarker: %v", err)
		}
		if err == nil {
			if tc, tr := p.TilesAcross(); tc*tr > maxTiles {
				t.Errorf("a plan of %d×%d tiles passed Check", tc, tr)
			} else if tc*tr <= 1<<16 { // a list of millions of tiles is slow, not wrong
				_ = p.Tiles()
			}
			if b, _ := p.Encode(); string(b) != string(data) {
				t.Error("a decoded plan encodes to other bytes")
			}
		}
	})
}

func FuzzDecodeTilePart(f *testing.F) {
	fuzzSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		tp, err := DecodeTilePart(data)
		if err != nil && !isCorrupt(err) {
			t.Errorf("not an ErrCorrupt with CorruptMarker: %v", err)
		}
		if err == nil {
			if tp.W*tp.H > 0 {
				_ = tp.Least[tp.W*tp.H-1]
			}
			if b, _ := tp.Encode(); string(b) != string(data) {
				t.Error("a decoded tile part encodes to other bytes")
			}
		}
	})
}
