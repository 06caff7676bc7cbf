package tiling

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/gob"
	"errors"
	"hash/crc32"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"glidereach/reach"
)

// fullPlan is a plan with every field set to a value other than its zero
// value, so a field the codec forgot shows up in the round trip.
func fullPlan() *Plan {
	return &Plan{
		Lattice:    Lattice{EPSG: 32733, X0: 500015, Y0: 9944985, DX: 30, DY: 30.5, Cols: 333, Rows: 222},
		Tile:       64,
		Fields:     []reach.Target{{Name: "Invented Meadow", Lat: -0.5, Lon: -24.5, Elev: 312.5, Reserve: 250}, {Name: "Ω field", Lat: -0.51, Lon: -24.49, Elev: 0, Reserve: 200}},
		Candidates: []reach.Target{{Name: "C", Lat: -0.6, Lon: -24.4, Elev: 100, Reserve: 150}},
		Models:     []LossGrid{{HMin: -100, HMax: 3000, Rows: 2, Dirs: 4, Values: []float64{0.03, 0.04, math.Inf(1), 0.05, 0.031, 0.041, 0.051, math.Copysign(0, -1)}}},
		Clearance:  100,
		Alt:        1000,
		AGL:        true,
		Ceiling:    1300,
		Cell:       30.87,
		Flat:       12,
		Notes:      []string{"a coarser cell", ""},
	}
}

func fullTileResult() *TileResult {
	n := 20 * 18
	t := &TileResult{Tile: TileID{Col: 2, Row: 3}, C0: 40, R0: 54, Cols: 20, Rows: 18,
		Least: make([]float32, n), Best: make([]int32, n), Count: make([]uint8, n), Flown: make([]float32, n),
		Mask: make([]byte, (n+7)/8), BlockAreas: []float64{900.5, 901.25, 902, 903},
		ZoneCells: 300, CoveredCells: 120, ZoneArea: 270000.5, CoveredArea: 108000.25,
		Fields: []FieldArea{{Field: 0, Covers: 1e5, Exclusive: 5e4}, {Field: 1, Covers: 2e4, Exclusive: 0}},
		Gains:  []CandidateCells{{Field: 2, Cells: []int32{0, 5, 359}, Area: 2700}}}
	for i := range n {
		t.Least[i] = float32(400 + i)
		t.Best[i] = int32(i%3) - 1
		t.Count[i] = uint8(i % 4)
		t.Flown[i] = float32(1000 + i%7)
		t.Mask[i/8] |= byte(i%3) << (i % 8)
	}
	t.Least[7] = float32(math.NaN())
	return t
}

// The plan's and tile result's fields are those the codec writes: a field
// added to a struct must be added to codec.go (and codecVersion bumped),
// then here.
func TestCodecCoversEveryField(t *testing.T) {
	for _, c := range []struct {
		v    any
		want int
	}{{Plan{}, 12}, {Lattice{}, 7}, {reach.Target{}, 5}, {LossGrid{}, 5}, {TileResult{}, 17}, {FieldArea{}, 3}, {CandidateCells{}, 3}, {TilePart{}, 7}, {TileID{}, 2}} {
		if n := reflect.TypeOf(c.v).NumField(); n != c.want {
			t.Errorf("%T has %d fields, the codec writes %d: update codec.go, codecVersion and this test", c.v, n, c.want)
		}
	}
}

func TestCodecRoundTrip(t *testing.T) {
	p := fullPlan()
	pb, _ := p.Encode()
	p2, err := DecodePlan(pb)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(p, p2) {
		t.Errorf("plan round trip:\n got %+v\nwant %+v", p2, p)
	}
	if math.Signbit(p2.Models[0].Values[7]) != true {
		t.Error("−0 lost its sign")
	}
	tr := fullTileResult()
	tb, _ := tr.Encode()
	tr2, err := DecodeTileResult(tb)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(float64(tr2.Least[7])) {
		t.Error("NaN least altitude lost")
	}
	tr.Least[7], tr2.Least[7] = 0, 0 // DeepEqual sees NaN ≠ NaN
	if !reflect.DeepEqual(tr, tr2) {
		t.Errorf("tile result round trip differs")
	}
	// nil stays nil where nil means something (Flown: constant altitude;
	// Mask: every cell).
	tr.Flown, tr.Mask = nil, nil
	tb, _ = tr.Encode()
	if tr3, err := DecodeTileResult(tb); err != nil || tr3.Flown != nil || tr3.Mask != nil {
		t.Errorf("nil Flown/Mask: %v, %v, %v", err, tr3 != nil && tr3.Flown != nil, tr3 != nil && tr3.Mask != nil)
	}
	tp := &TilePart{Tile: TileID{1, 2}, Field: 3, C0: 4, R0: 5, W: 2, H: 3, Least: []float32{1, 2, 3, 4, 5, 6}}
	b, _ := tp.Encode()
	tp2, err := DecodeTilePart(b)
	if err != nil || !reflect.DeepEqual(tp, tp2) {
		t.Errorf("tile part round trip: %v %+v", err, tp2)
	}
}

// The layout of the format, built here byte by byte from the description
// in codec.go (the format is this project's own; source: codec.go's
// comment), so a change of the encoder that the comment does not describe
// fails.
func TestCodecLayout(t *testing.T) {
	tp := &TilePart{Tile: TileID{Col: 1, Row: 2}, Field: 7, C0: 16, R0: 32, W: 2, H: 1, Least: []float32{412.5, float32(math.NaN())}}
	var want []byte
	want = append(want, "GRWF"...)
	want = append(want, 'p')
	want = binary.LittleEndian.AppendUint16(want, 1)
	for _, v := range []int64{1, 2, 7, 16, 32, 2, 1, 2} { // Col, Row, Field, C0, R0, W, H, len(Least)
		want = binary.LittleEndian.AppendUint64(want, uint64(v))
	}
	want = binary.LittleEndian.AppendUint32(want, math.Float32bits(412.5))
	want = binary.LittleEndian.AppendUint32(want, math.Float32bits(tp.Least[1]))
	want = binary.LittleEndian.AppendUint32(want, crc32.ChecksumIEEE(want))
	got, _ := tp.Encode()
	if !bytes.Equal(got, want) {
		t.Errorf("tile part bytes\n got %x\nwant %x", got, want)
	}
	// Integers are two's complement int64: −1 is 8 bytes of 0xff.
	neg := &TilePart{Tile: TileID{Col: -1}, W: 0, H: 0}
	b, _ := neg.Encode()
	if !bytes.Equal(b[7:15], bytes.Repeat([]byte{0xff}, 8)) {
		t.Errorf("−1 encoded as %x", b[7:15])
	}
}

// isCorrupt reports whether err wraps ErrCorrupt and says so in its text
// (CorruptMarker), which is how glidereach-pipeline recognises a damaged
// work file in a worker's error.
func isCorrupt(err error) bool {
	return errors.Is(err, ErrCorrupt) && strings.Contains(err.Error(), CorruptMarker)
}

// Every truncation and every single-byte change of a valid encoding is
// refused with ErrCorrupt (the checksum catches what the lengths do not),
// CorruptMarker in the error's text.
func TestCodecRejectsDamage(t *testing.T) {
	pb, _ := fullPlan().Encode()
	tb, _ := fullTileResult().Encode()
	pp, _ := (&TilePart{Tile: TileID{1, 2}, W: 2, H: 1, Least: []float32{1, 2}}).Encode()
	for _, c := range []struct {
		name   string
		data   []byte
		decode func([]byte) error
	}{
		{"plan", pb, func(b []byte) error { _, err := DecodePlan(b); return err }},
		{"tile result", tb, func(b []byte) error { _, err := DecodeTileResult(b); return err }},
		{"tile part", pp, func(b []byte) error { _, err := DecodeTilePart(b); return err }},
	} {
		for n := range len(c.data) {
			if err := c.decode(c.data[:n]); !isCorrupt(err) {
				t.Fatalf("%s truncated to %d of %d bytes: %v", c.name, n, len(c.data), err)
			}
		}
		step := max(1, len(c.data)/300)
		for i := 0; i < len(c.data); i += step {
			d := bytes.Clone(c.data)
			d[i] ^= 0x40
			if err := c.decode(d); !isCorrupt(err) {
				t.Fatalf("%s with byte %d changed: %v", c.name, i, err)
			}
		}
		if err := c.decode(append(bytes.Clone(c.data), 0)); !isCorrupt(err) {
			t.Fatalf("%s with a byte appended: %v", c.name, err)
		}
	}
	// Kinds are not interchangeable, and another version is refused.
	if _, err := DecodeTileResult(pb); !isCorrupt(err) || !strings.Contains(err.Error(), "kind") {
		t.Errorf("a plan decoded as a tile result: %v", err)
	}
	old := bytes.Clone(pb)
	old[5] = 9
	binary.LittleEndian.PutUint32(old[len(old)-4:], crc32.ChecksumIEEE(old[:len(old)-4]))
	if _, err := DecodePlan(old); !isCorrupt(err) || !strings.Contains(err.Error(), "version 9") {
		t.Errorf("version 9 accepted or not named: %v", err)
	}
	// A gob-encoded plan (the earlier work-file format) is refused.
	var g bytes.Buffer
	if err := gob.NewEncoder(&g).Encode(fullPlan()); err != nil {
		t.Fatal(err)
	}
	if _, err := DecodePlan(g.Bytes()); !isCorrupt(err) {
		t.Errorf("a gob plan: %v", err)
	}
}

// The checks after decoding (a tile result's or part's shape, a plan's
// Check) give ErrCorrupt errors with CorruptMarker in their text too, and
// the marker is ErrCorrupt's whole text.
func TestCorruptMarkerInEveryError(t *testing.T) {
	if ErrCorrupt.Error() != CorruptMarker {
		t.Fatalf("ErrCorrupt says %q, CorruptMarker is %q", ErrCorrupt, CorruptMarker)
	}
	bad := func(f func(*TileResult)) []byte {
		tr := fullTileResult()
		f(tr)
		b, _ := tr.Encode()
		return b
	}
	badPlan := fullPlan()
	badPlan.Lattice.Cols = -5
	pb, _ := badPlan.Encode()
	pp, _ := (&TilePart{Tile: TileID{1, 2}, W: 3, H: 1, Least: []float32{1, 2}}).Encode()
	for _, c := range []struct {
		name string
		err  func() error
	}{
		{"tile result too large", func() error {
			_, err := DecodeTileResult(bad(func(tr *TileResult) { tr.Cols = 1 << 15 }))
			return err
		}},
		{"tile result arrays", func() error {
			_, err := DecodeTileResult(bad(func(tr *TileResult) { tr.Best = tr.Best[1:] }))
			return err
		}},
		{"tile result gain cell", func() error {
			_, err := DecodeTileResult(bad(func(tr *TileResult) { tr.Gains[0].Cells[2] = 360 }))
			return err
		}},
		{"tile part values", func() error { _, err := DecodeTilePart(pp); return err }},
		{"plan failing Check", func() error { _, err := DecodePlan(pb); return err }},
	} {
		if err := c.err(); !isCorrupt(err) {
			t.Errorf("%s: %v", c.name, err)
		}
	}
}

// A damaged tile file in a work directory stops the resumed run with an
// error naming the file.
func TestDamagedTileFileNamed(t *testing.T) {
	sc := newScene(t, 64)
	p := sc.plan(t, 16, 700)
	dir := t.TempDir()
	if _, err := Run(context.Background(), sc.src, p, RunOptions{WorkDir: dir, Workers: 1}); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "tiles", p.Tiles()[1].String()+".gob")
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, data[:len(data)-3], 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = Run(context.Background(), sc.src, p, RunOptions{WorkDir: dir, Workers: 1})
	if err == nil || !strings.Contains(err.Error(), path) || !isCorrupt(err) {
		t.Errorf("resume over a truncated tile: %v", err)
	}
}

// writeWorkEnv, when set, makes TestMain's helper write a run's work files
// into the directory it names and exit (see TestWorkFilesSameAcrossProcesses).
const writeWorkEnv = "GLIDEREACH_TILING_WRITE_WORK"

func TestMain(m *testing.M) {
	if dir := os.Getenv(writeWorkEnv); dir != "" {
		if err := writeWorkFiles(dir, os.Getenv(writeWorkEnv+"_GOB") != ""); err != nil {
			os.Stderr.WriteString(err.Error() + "\n")
			os.Exit(1)
		}
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// writeWorkFiles runs a small plan into dir. With gobFirst the process
// encodes other types with encoding/gob first, which under a gob work-file
// format shifted the type numbers of what it wrote next.
func writeWorkFiles(dir string, gobFirst bool) error {
	if gobFirst {
		var b bytes.Buffer
		jobs, _, err := benchPlan().FieldJobs()
		if err != nil {
			return err
		}
		if err := gob.NewEncoder(&b).Encode(jobs); err != nil {
			return err
		}
		if err := gob.NewEncoder(&b).Encode(map[string][]float32{"x": {1}}); err != nil {
			return err
		}
	}
	sc := newScene(&testing.T{}, 96)
	_, err := Run(context.Background(), sc.src, sc.plan(&testing.T{}, 32, 700), RunOptions{WorkDir: dir, Workers: 2})
	return err
}

// benchPlan is any valid plan, for the helper's gob encoding.
func benchPlan() *Plan {
	p := fullPlan()
	p.Models[0] = LossGrid{HMin: 0, HMax: 1, Rows: 2, Dirs: 4, Values: make([]float64, 8)}
	return p
}

// Two separate processes (this test binary run again) write the same plan's
// work files; every file is the same bytes in both, and the same as this
// process writes.
func TestWorkFilesSameAcrossProcesses(t *testing.T) {
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	var dirs []string
	for i, gobFirst := range []bool{false, true} {
		dir := filepath.Join(t.TempDir(), "work")
		cmd := exec.Command(exe, "-test.run=^$")
		cmd.Env = append(os.Environ(), writeWorkEnv+"="+dir)
		if gobFirst {
			cmd.Env = append(cmd.Env, writeWorkEnv+"_GOB=1")
		}
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("process %d: %v\n%s", i, err, out)
		}
		dirs = append(dirs, dir)
	}
	here := filepath.Join(t.TempDir(), "work")
	if err := writeWorkFiles(here, false); err != nil {
		t.Fatal(err)
	}
	dirs = append(dirs, here)
	files := func(dir string) map[string][]byte {
		out := map[string][]byte{}
		err := filepath.WalkDir(dir, func(path string, d os.DirEntry, err error) error {
			if err != nil || d.IsDir() {
				return err
			}
			b, err := os.ReadFile(path)
			rel, _ := filepath.Rel(dir, path)
			out[rel] = b
			return err
		})
		if err != nil {
			t.Fatal(err)
		}
		return out
	}
	want := files(dirs[0])
	if len(want) < 5 || want["plan.gob"] == nil {
		t.Fatalf("process 0 wrote %d files", len(want))
	}
	for i, dir := range dirs[1:] {
		got := files(dir)
		if len(got) != len(want) {
			t.Fatalf("run %d wrote %d files, process 0 %d", i+1, len(got), len(want))
		}
		for name, b := range want {
			if !bytes.Equal(got[name], b) {
				t.Errorf("%s: run %d (%s) wrote other bytes than process 0", name, i+1, []string{"process with gob first", "this process"}[i])
			}
		}
	}
}

// bigTile is a full DefaultTile × DefaultTile result with an altitude flown
// per cell and a zone mask, the largest work file a run writes per tile.
func bigTile() *TileResult {
	const s = DefaultTile
	n := s * s
	t := &TileResult{Cols: s, Rows: s, Least: make([]float32, n), Best: make([]int32, n), Count: make([]uint8, n),
		Flown: make([]float32, n), Mask: make([]byte, (n+7)/8), BlockAreas: make([]float64, (s/areaBlock)*(s/areaBlock))}
	for i := range n {
		t.Least[i] = float32(i%977) + 400
		t.Best[i] = int32(i % 13)
	}
	return t
}

// The work files of a tile: encoding and decoding cost against computing
// the tile (seconds); run with -benchmem.
func BenchmarkTileResultEncode(b *testing.B) {
	t := bigTile()
	b.ReportAllocs()
	b.SetBytes(int64(len(encodeTileResult(t))))
	for b.Loop() {
		if _, err := t.Encode(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkTileResultDecode(b *testing.B) {
	data, _ := bigTile().Encode()
	b.ReportAllocs()
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := DecodeTileResult(data); err != nil {
			b.Fatal(err)
		}
	}
}

// The same tile through encoding/gob, the earlier format, for comparison.
func BenchmarkTileResultGob(b *testing.B) {
	t := bigTile()
	b.ReportAllocs()
	for b.Loop() {
		var buf bytes.Buffer
		if err := gob.NewEncoder(&buf).Encode(t); err != nil {
			b.Fatal(err)
		}
		var back TileResult
		if err := gob.NewDecoder(&buf).Decode(&back); err != nil {
			b.Fatal(err)
		}
	}
}
