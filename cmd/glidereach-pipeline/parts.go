package main

import (
	"encoding/binary"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"

	"glidereach/reach/tiling"
)

// A field job's parts on disk: what tiling.RunField gave every tile the
// job's window touches, kept in the work directory so that a run stopped
// before or during the merges does not solve that field again.
//
//	parts/j<job index, 6 digits or more>.parts, written through a temporary
//	file and a rename (the whole file or none), little-endian:
//	  magic  "GLRPART1"                8 bytes
//	  job    uint32                    the job index (fields, then candidates)
//	  count  uint32                    parts that follow
//	  count × { length uint32, length bytes of tiling.TilePart.Encode }
//
// The parts are kept only until every tile is merged: the finish step
// removes parts/ once the outputs are written (a run found finished needs
// no field run).

const partsMagic = "GLRPART1"

// partsPath is the file of job k's parts in work directory dir.
func partsPath(dir string, k int) string {
	return filepath.Join(dir, "parts", fmt.Sprintf("j%06d.parts", k))
}

// encodeParts returns the parts file of job k holding the encoded parts.
func encodeParts(k int, encoded [][]byte) []byte {
	n := len(partsMagic) + 8
	for _, e := range encoded {
		n += 4 + len(e)
	}
	b := make([]byte, 0, n)
	b = append(b, partsMagic...)
	b = binary.LittleEndian.AppendUint32(b, uint32(k))
	b = binary.LittleEndian.AppendUint32(b, uint32(len(encoded)))
	for _, e := range encoded {
		b = binary.LittleEndian.AppendUint32(b, uint32(len(e)))
		b = append(b, e...)
	}
	return b
}

// rawPart is one encoded part (tiling.TilePart.Encode) and its tile.
type rawPart struct {
	Tile tiling.TileID
	Data []byte
}

// decodeParts reads the parts file data of job (its index and the tiles
// its window touches): every part must be the job's, of one of its tiles,
// each tile at most once. Errors say what is wrong (the caller names the
// file).
func decodeParts(data []byte, job *tiling.FieldJob) ([]rawPart, error) {
	if len(data) < len(partsMagic)+8 || string(data[:len(partsMagic)]) != partsMagic {
		return nil, errors.New("not a parts file (no GLRPART1 header)")
	}
	k := binary.LittleEndian.Uint32(data[8:])
	n := binary.LittleEndian.Uint32(data[12:])
	if int64(k) != int64(job.Index) {
		return nil, fmt.Errorf("holds the parts of job %d, not %d", k, job.Index)
	}
	if int64(n) > int64(len(job.Tiles)) {
		return nil, fmt.Errorf("holds %d parts; the job touches %d tiles", n, len(job.Tiles))
	}
	rest := data[16:]
	parts := make([]rawPart, 0, n)
	seen := map[tiling.TileID]bool{}
	for i := range n {
		if len(rest) < 4 {
			return nil, fmt.Errorf("part %d of %d: truncated", i+1, n)
		}
		l := binary.LittleEndian.Uint32(rest)
		rest = rest[4:]
		if uint64(l) > uint64(len(rest)) {
			return nil, fmt.Errorf("part %d of %d: %d bytes announced, %d left", i+1, n, l, len(rest))
		}
		raw := rest[:l:l]
		p, err := tiling.DecodeTilePart(raw)
		if err != nil {
			return nil, fmt.Errorf("part %d of %d: %w", i+1, n, err)
		}
		rest = rest[l:]
		if p.Field != job.Index || !slices.Contains(job.Tiles, p.Tile) || seen[p.Tile] {
			return nil, fmt.Errorf("part %d of %d: job %d, tile %v is not one of job %d's tiles, or is there twice", i+1, n, p.Field, p.Tile, job.Index)
		}
		seen[p.Tile] = true
		parts = append(parts, rawPart{Tile: p.Tile, Data: raw})
	}
	if len(rest) != 0 {
		return nil, fmt.Errorf("%d bytes after the last part", len(rest))
	}
	return parts, nil
}

// loadParts reads job's parts from dir; ok is false when the job's file is
// not there (the job has not run to its end). A damaged file is an error
// wrapping tiling.ErrCorrupt, with the file's path.
func loadParts(dir string, job *tiling.FieldJob) (parts []rawPart, ok bool, err error) {
	path := partsPath(dir, job.Index)
	data, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, false, nil
	}
	if err != nil {
		return nil, false, err
	}
	if parts, err = decodeParts(data, job); err != nil {
		if !errors.Is(err, tiling.ErrCorrupt) {
			err = fmt.Errorf("%w: %w", tiling.ErrCorrupt, err)
		}
		return nil, false, fmt.Errorf("%s: %w", path, err)
	}
	return parts, true, nil
}

// partsOnDisk counts the field jobs of plan p whose parts are in dir.
func partsOnDisk(dir string, p *tiling.Plan) int {
	n := 0
	for k := range len(p.Fields) + len(p.Candidates) {
		if _, err := os.Stat(partsPath(dir, k)); err == nil {
			n++
		}
	}
	return n
}
