package main

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"strings"
	"testing"

	"glidereach/reach/tiling"
)

// partsCase is a job of index 2 touching two tiles, and its two parts
// encoded (the parts file layout is this package's own, parts.go; no
// outside source).
func partsCase(t testing.TB) (*tiling.FieldJob, [][]byte) {
	job := &tiling.FieldJob{Index: 2, Tiles: []tiling.TileID{{Row: 0, Col: 0}, {Row: 0, Col: 1}}}
	var enc [][]byte
	for i, id := range job.Tiles {
		p := tiling.TilePart{Tile: id, Field: 2, C0: i, R0: 1, W: 2, H: 1, Least: []float32{1200, float32(1300 + i)}}
		b, err := p.Encode()
		if err != nil {
			t.Fatal(err)
		}
		enc = append(enc, b)
	}
	return job, enc
}

func TestPartsFileRoundTripAndErrors(t *testing.T) {
	job, enc := partsCase(t)
	good := encodeParts(2, enc)
	got, err := decodeParts(good, job)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || got[0].Tile != job.Tiles[0] || got[1].Tile != job.Tiles[1] || !bytes.Equal(got[1].Data, enc[1]) {
		t.Fatalf("read back %+v", got)
	}
	other := &tiling.FieldJob{Index: 3, Tiles: job.Tiles}
	oneTile := &tiling.FieldJob{Index: 2, Tiles: job.Tiles[:1]}
	twice := encodeParts(2, [][]byte{enc[0], enc[0]})
	count := bytes.Clone(good)
	binary.LittleEndian.PutUint32(count[12:], 1)
	cases := []struct {
		name string
		data []byte
		job  *tiling.FieldJob
		want string
	}{
		{"empty", nil, job, "not a parts file"},
		{"other magic", append([]byte("GLRTILE1"), good[8:]...), job, "not a parts file"},
		{"another job's", good, other, "job 2, not 3"},
		{"more parts than tiles", good, oneTile, "holds 2 parts"},
		{"truncated", good[:len(good)-5], job, "announced"},
		{"no length", good[:16+4+len(enc[0])+2], job, "truncated"},
		{"trailing bytes", append(bytes.Clone(good), 0), job, "after the last part"},
		{"count too small", count, job, "after the last part"},
		{"a tile twice", twice, job, "twice"},
		{"a tile not the job's", encodeParts(2, enc), &tiling.FieldJob{Index: 2, Tiles: []tiling.TileID{{Row: 0, Col: 0}, {Row: 5, Col: 5}}}, "not one of job 2's tiles"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := decodeParts(c.data, c.job)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one saying %q", err, c.want)
			}
		})
	}
}

func FuzzDecodeParts(f *testing.F) {
	job, enc := partsCase(f)
	f.Add(encodeParts(2, enc))
	f.Add(encodeParts(2, enc[:1]))
	f.Add([]byte("GLRPART1\x02\x00\x00\x00\xff\xff\xff\xff"))
	f.Fuzz(func(t *testing.T, data []byte) {
		parts, err := decodeParts(data, job)
		if err != nil {
			return
		}
		// What was accepted writes back to the same bytes.
		raw := make([][]byte, len(parts))
		for i, p := range parts {
			raw[i] = p.Data
		}
		if !bytes.Equal(encodeParts(job.Index, raw), data) {
			t.Errorf("accepted parts file does not encode back to its bytes")
		}
	})
}

func TestLoadPartsDamagedFile(t *testing.T) {
	// A parts file damaged outside the run is reported as a damaged work
	// file (tiling.ErrCorrupt, which the launcher turns into an input error
	// on --work-dir) with its path; a missing one is "not run yet".
	job, enc := partsCase(t)
	dir := t.TempDir()
	if _, ok, err := loadParts(dir, job); ok || err != nil {
		t.Fatalf("no file: ok %v, err %v", ok, err)
	}
	data := encodeParts(job.Index, enc)
	data[len(data)-3] ^= 0x10
	if err := writeAtomic(partsPath(dir, job.Index), data); err != nil {
		t.Fatal(err)
	}
	_, ok, err := loadParts(dir, job)
	if ok || !errors.Is(err, tiling.ErrCorrupt) || !strings.Contains(err.Error(), partsPath(dir, job.Index)) {
		t.Errorf("damaged file: ok %v, err %v", ok, err)
	}
	// As Beam passes it on: text only, inside its own lines.
	if line := corruptLine(fmt.Errorf("bundle failed:\n\tcaused by:\n%s", err.Error())); !strings.Contains(line, tiling.CorruptMarker) || !strings.Contains(line, partsPath(dir, job.Index)) {
		t.Errorf("the launcher does not find the damaged file in a worker's error text: %q", line)
	}
}
