package tiling

import (
	"context"
	"testing"
)

// The work files are parsed back on a resume: a damaged or hostile file
// must give an error, never a panic or an inconsistent result.
func FuzzDecodeTileResult(f *testing.F) {
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
	b, err := tr.Encode()
	if err != nil {
		f.Fatal(err)
	}
	f.Add(b)
	f.Add(b[:len(b)/2])
	pb, _ := p.Encode()
	f.Add(pb)
	f.Fuzz(func(t *testing.T, data []byte) {
		if tr, err := DecodeTileResult(data); err == nil {
			// Consistent: every array indexable by the tile's cells.
			n := tr.Cols * tr.Rows
			_ = tr.Least[n-1]
			_ = tr.CellArea(tr.Cols-1, tr.Rows-1)
			_ = tr.InZone(n - 1)
		}
		if p, err := DecodePlan(data); err == nil {
			_ = p.Tiles()
		}
		if tp, err := DecodeTilePart(data); err == nil {
			_ = len(tp.Least)
		}
	})
}
