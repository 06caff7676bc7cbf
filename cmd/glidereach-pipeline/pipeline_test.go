package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	beamlog "github.com/apache/beam/sdks/v2/go/pkg/beam/log"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/plan"
	"glidereach/reach/tiling"
	"glidereach/terrain"
	"glidereach/wind"
)

func TestMain(m *testing.M) {
	// A Beam program calls beam.Init before building a pipeline; in worker
	// mode it runs the worker instead (never in these tests: Prism runs the
	// steps in this process).
	beamlog.LogLevel = "warn"
	beam.Init()
	os.Exit(m.Run())
}

// scene is a small synthetic case: terrain.Synthetic's invented relief
// (n × n cells of 1 arc-second) written as a GeoTIFF, the generic trainer
// in an invented three-layer wind, three invented fields and a box inside
// the relief.
type scene struct {
	dem    string
	src    terrain.Source
	plan   *tiling.Plan
	box    string
	zone   input.Zone
	fields []reach.Target
}

func newScene(t testing.TB, n, tile int, alt float64) *scene {
	t.Helper()
	g := terrain.Synthetic(7, n, n, 1.0/3600)
	dem := filepath.Join(t.TempDir(), "relief.tif")
	var buf bytes.Buffer
	if err := terrain.WriteGeoTIFF(&buf, g); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(dem, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	src, err := terrain.Open(dem)
	if err != nil {
		t.Fatal(err)
	}
	ac, err := reach.Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	wp, err := wind.NewProfile([]wind.Layer{{Alt: 0, Dir: 240, Speed: 5}, {Alt: 1500, Dir: 270, Speed: 10}, {Alt: 3000, Dir: 290, Speed: 18}})
	if err != nil {
		t.Fatal(err)
	}
	tab, err := reach.NewTable(ac, reach.Atmosphere{}, wp, reach.Conditions{}, -100, alt+400)
	if err != nil {
		t.Fatal(err)
	}
	lg, err := tiling.SampleLoss(tab, -100, alt+400)
	if err != nil {
		t.Fatal(err)
	}
	w, s, e, nn := g.Extent()
	sc := &scene{dem: dem, src: src}
	for i, q := range [][2]float64{{0.3, 0.35}, {0.62, 0.55}, {0.45, 0.7}} {
		lon, lat := w+q[0]*(e-w), s+q[1]*(nn-s)
		el, ok := g.Elevation(lat, lon)
		if !ok {
			t.Fatal("field off the grid")
		}
		sc.fields = append(sc.fields, reach.Target{Name: fmt.Sprintf("Field %c", 'A'+i), Lat: lat, Lon: lon, Elev: el, Reserve: 250})
	}
	bw, bs, be, bn := w+0.25*(e-w), s+0.25*(nn-s), e-0.25*(e-w), nn-0.25*(nn-s)
	sc.box = fmt.Sprintf("%.6f,%.6f,%.6f,%.6f", bs, bw, bn, be)
	if sc.zone, err = input.ParseBox(sc.box); err != nil {
		t.Fatal(err)
	}
	lat, err := tiling.LatticeFor(src, bw, bs, be, bn, 0)
	if err != nil {
		t.Fatal(err)
	}
	sc.plan = &tiling.Plan{Lattice: lat, Tile: tile, Fields: sc.fields, Models: []tiling.LossGrid{lg},
		Clearance: 100, Alt: alt, Ceiling: alt + 300, Cell: src.Resolution()}
	return sc
}

// runPipeline runs the Beam pipeline of sc on Prism in a new work directory
// and returns the directory.
func runPipeline(t testing.TB, sc *scene, out Outputs) string {
	t.Helper()
	dir := t.TempDir()
	enc, err := sc.plan.Encode()
	if err != nil {
		t.Fatal(err)
	}
	if err := writeAtomic(filepath.Join(dir, "plan.gob"), enc); err != nil {
		t.Fatal(err)
	}
	in := Inputs{Plan: enc, Terrain: []string{sc.dem}, Box: sc.box, WorkDir: dir}
	p := buildPipeline(in, out, sc.plan, nil)
	if _, err := prism.Execute(context.Background(), p); err != nil {
		t.Fatalf("pipeline on Prism: %v", err)
	}
	return dir
}

// localCOG writes the COG of a local run as the pipeline's finish step
// does (tiling.WriteCOG, the same description) and returns its bytes.
func localCOG(t *testing.T, sc *scene, res *tiling.Result) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := tiling.WriteCOG(&b, sc.plan, res, plan.TiledCOGDescription); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// sameTiles fails unless the two work directories hold the same tile
// files, byte for byte, for every tile of the plan (the library's work-file
// encoding is the same bytes in every process); it returns the number of
// covered cells.
func sameTiles(t *testing.T, plan *tiling.Plan, want, got string) int {
	t.Helper()
	covered := 0
	for _, id := range plan.Tiles() {
		w := readTile(t, filepath.Join(want, "tiles", id.String()+".gob"))
		g := readTile(t, filepath.Join(got, "tiles", id.String()+".gob"))
		if !bytes.Equal(g, w) {
			t.Errorf("tile %v: the pipeline's tile file differs from the local run's", id)
		}
		tr, err := tiling.DecodeTileResult(g)
		if err != nil {
			t.Fatal(err)
		}
		covered += int(tr.CoveredCells)
	}
	return covered
}

// readTile reads a tile file and checks that it decodes.
func readTile(t *testing.T, path string) []byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := tiling.DecodeTileResult(data); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return data
}

func TestPipelineMatchesLocalTiledRun(t *testing.T) {
	// The reference is the library's local tiled path (tiling.Run and
	// tiling.WriteCOG), which the pipeline must reproduce exactly: every
	// tile's result in the work directory, the COG written from them (byte
	// for byte) and the totals (bit for bit).
	sc := newScene(t, 200, 64, 1400)
	local, err := tiling.Run(context.Background(), sc.src, sc.plan, tiling.RunOptions{WorkDir: t.TempDir(), Zone: sc.zone.Contains, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	cog := filepath.Join(t.TempDir(), "least.tif")
	dir := runPipeline(t, sc, Outputs{COG: cog})
	if n := len(sc.plan.Tiles()); n < 4 {
		t.Fatalf("the case has %d tiles; the check needs several", n)
	}
	if sameTiles(t, sc.plan, local.Dir, dir) == 0 {
		t.Fatal("no cell is covered: the case checks nothing")
	}
	got, err := os.ReadFile(cog)
	if err != nil {
		t.Fatal(err)
	}
	if want := localCOG(t, sc, local); !bytes.Equal(got, want) {
		t.Errorf("the pipeline's COG (%d bytes) differs from the local run's (%d bytes)", len(got), len(want))
	}
	var s summary
	data, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &s); err != nil {
		t.Fatal(err)
	}
	lt := local.Totals
	if s.CoveredFraction != lt.CoveredFraction || s.ZoneAreaM2 != lt.ZoneArea || s.CoveredCells != lt.CoveredCells {
		t.Errorf("summary %+v, local totals: covered %v of %v m², %d cells", s, lt.CoveredFraction, lt.ZoneArea, lt.CoveredCells)
	}
	for k, f := range s.Fields {
		if f.CoversM2 != lt.Covers[k] || f.ExclusiveM2 != lt.Exclusive[k] {
			t.Errorf("field %s: covers %v, alone %v m²; local %v, %v", f.Name, f.CoversM2, f.ExclusiveM2, lt.Covers[k], lt.Exclusive[k])
		}
	}
}

func TestPipelineResumesFromFinishedTiles(t *testing.T) {
	// A run that stopped part-way (here: tiles removed from a finished
	// work directory, as a killed job leaves it) continues from the tiles
	// left and gives the same bytes as the uninterrupted run.
	sc := newScene(t, 200, 64, 1400)
	whole := filepath.Join(t.TempDir(), "whole.tif")
	dir := runPipeline(t, sc, Outputs{COG: whole})
	tiles := sc.plan.Tiles()
	keep := map[tiling.TileID][]byte{}
	for i, id := range tiles {
		path := filepath.Join(dir, "tiles", id.String()+".gob")
		keep[id] = readTile(t, path)
		if i%2 == 0 {
			if err := os.Remove(path); err != nil {
				t.Fatal(err)
			}
		}
	}
	enc, err := sc.plan.Encode()
	if err != nil {
		t.Fatal(err)
	}
	done, err := claimWorkDir(dir, enc)
	if err != nil {
		t.Fatal(err)
	}
	if len(done) != len(tiles)/2 {
		t.Fatalf("%d tiles found finished, want %d", len(done), len(tiles)/2)
	}
	resumed := filepath.Join(t.TempDir(), "resumed.tif")
	in := Inputs{Plan: enc, Terrain: []string{sc.dem}, Box: sc.box, WorkDir: dir}
	if _, err := prism.Execute(context.Background(), buildPipeline(in, Outputs{COG: resumed}, sc.plan, done)); err != nil {
		t.Fatal(err)
	}
	for _, id := range tiles {
		if b := readTile(t, filepath.Join(dir, "tiles", id.String()+".gob")); !bytes.Equal(b, keep[id]) {
			t.Errorf("tile %v differs after the resumed run", id)
		}
	}
	a, err := os.ReadFile(whole)
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(resumed)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a, b) {
		t.Error("the resumed run's COG differs from the uninterrupted run's")
	}
}

// resumeRun claims dir for sc's plan (as the command does) and runs the
// pipeline there on Prism with ctx, writing the COG to cog.
func resumeRun(ctx context.Context, t *testing.T, sc *scene, dir, cog string) error {
	t.Helper()
	enc, err := sc.plan.Encode()
	if err != nil {
		t.Fatal(err)
	}
	done, err := claimWorkDir(dir, enc)
	if err != nil {
		t.Fatal(err)
	}
	in := Inputs{Plan: enc, Terrain: []string{sc.dem}, Box: sc.box, WorkDir: dir}
	_, err = prism.Execute(ctx, buildPipeline(in, Outputs{COG: cog}, sc.plan, done))
	return err
}

// quietPrism discards Prism's log lines (it logs every failed bundle at
// ERROR level) until the test ends: the tests that stop a run on purpose
// check the error Execute returns instead.
func quietPrism(t *testing.T) {
	old := slog.Default()
	slog.SetDefault(slog.New(slog.DiscardHandler))
	t.Cleanup(func() { slog.SetDefault(old) })
}

// fieldRuns records the field jobs the pipeline computes (testFieldRunDone)
// until the test ends; fail, when not nil, decides the hook's error.
type fieldRuns struct {
	mu   sync.Mutex
	jobs []int
	fail func(n int) error // n: jobs computed so far, this one included
}

func watchFieldRuns(t *testing.T) *fieldRuns {
	quietPrism(t)
	fr := &fieldRuns{}
	testFieldRunDone = func(job int) error {
		fr.mu.Lock()
		defer fr.mu.Unlock()
		fr.jobs = append(fr.jobs, job)
		if fr.fail != nil {
			return fr.fail(len(fr.jobs))
		}
		return nil
	}
	t.Cleanup(func() { testFieldRunDone = nil })
	return fr
}

func (fr *fieldRuns) take() []int {
	fr.mu.Lock()
	defer fr.mu.Unlock()
	j := fr.jobs
	fr.jobs, fr.fail = nil, nil
	return j
}

// jobsOnDisk returns the jobs of plan p whose parts file is in dir.
func jobsOnDisk(dir string, p *tiling.Plan) map[int]bool {
	on := map[int]bool{}
	for k := range len(p.Fields) + len(p.Candidates) {
		if _, err := os.Stat(partsPath(dir, k)); err == nil {
			on[k] = true
		}
	}
	return on
}

// sameOutputs fails unless dir's tiles and the COG cog are those of the
// uninterrupted run (wantDir, wantCOG), and the parts are gone.
func sameOutputs(t *testing.T, sc *scene, wantDir, wantCOG, dir, cog string) {
	t.Helper()
	sameTiles(t, sc.plan, wantDir, dir)
	a, err := os.ReadFile(wantCOG)
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(cog)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a, b) {
		t.Error("the resumed run's COG differs from the uninterrupted run's")
	}
	if _, err := os.Stat(filepath.Join(dir, "parts")); !os.IsNotExist(err) {
		t.Errorf("parts/ is still in the work directory after the outputs were written (%v)", err)
	}
}

func TestPipelineResumesFromFieldRuns(t *testing.T) {
	// A run stopped during the field runs (here: the first field job to
	// finish fails the step after its parts are written, as a crash
	// would) keeps the parts of the jobs that finished; the same run again
	// computes only the other jobs and writes the same bytes as an
	// uninterrupted run.
	sc := newScene(t, 200, 64, 1400)
	wantCOG := filepath.Join(t.TempDir(), "whole.tif")
	fr := watchFieldRuns(t)
	wantDir := runPipeline(t, sc, Outputs{COG: wantCOG})
	all := len(fr.take())
	if all < 2 {
		t.Fatalf("%d field jobs ran; the case needs several", all)
	}
	dir, cog := t.TempDir(), filepath.Join(t.TempDir(), "least.tif")
	fr.fail = func(n int) error { return errors.New("stopped by the test") }
	if err := resumeRun(context.Background(), t, sc, dir, cog); err == nil {
		t.Fatal("the stopped run did not fail")
	}
	fr.take()
	kept := jobsOnDisk(dir, sc.plan)
	if len(kept) == 0 {
		t.Fatal("no field job's parts were kept")
	}
	if tiles, _ := filepath.Glob(filepath.Join(dir, "tiles", "*")); len(tiles) > 0 {
		t.Fatalf("tiles were merged before every field run ended: %v", tiles)
	}
	if err := resumeRun(context.Background(), t, sc, dir, cog); err != nil {
		t.Fatal(err)
	}
	again := fr.take()
	for _, k := range again {
		if kept[k] {
			t.Errorf("field job %d ran again although its parts were in the work directory", k)
		}
	}
	if len(again)+len(kept) != all {
		t.Errorf("%d jobs kept and %d run again, want %d in all", len(kept), len(again), all)
	}
	sameOutputs(t, sc, wantDir, wantCOG, dir, cog)
}

func TestPipelineResumesFromMerges(t *testing.T) {
	// A run stopped during the merges (here: the last tile's merge fails)
	// keeps every field job's parts and the tiles merged so far; with some
	// of those tiles removed too, the same run again solves no field and
	// writes the same bytes as an uninterrupted run.
	sc := newScene(t, 200, 64, 1400)
	wantCOG := filepath.Join(t.TempDir(), "whole.tif")
	fr := watchFieldRuns(t)
	wantDir := runPipeline(t, sc, Outputs{COG: wantCOG})
	all := len(fr.take())
	tiles := sc.plan.Tiles()
	last := tiles[len(tiles)-1]
	testBeforeMerge = func(id tiling.TileID) error {
		if id == last {
			return errors.New("stopped by the test")
		}
		return nil
	}
	t.Cleanup(func() { testBeforeMerge = nil })
	dir, cog := t.TempDir(), filepath.Join(t.TempDir(), "least.tif")
	if err := resumeRun(context.Background(), t, sc, dir, cog); err == nil {
		t.Fatal("the stopped run did not fail")
	}
	testBeforeMerge = nil
	fr.take()
	if n := len(jobsOnDisk(dir, sc.plan)); n != all {
		t.Fatalf("%d of %d field jobs' parts kept", n, all)
	}
	merged, _ := filepath.Glob(filepath.Join(dir, "tiles", "*.gob"))
	if len(merged) >= len(tiles) {
		t.Fatalf("%d of %d tiles merged: the run did not stop", len(merged), len(tiles))
	}
	for i, path := range merged {
		if i%2 == 0 {
			if err := os.Remove(path); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := resumeRun(context.Background(), t, sc, dir, cog); err != nil {
		t.Fatal(err)
	}
	if again := fr.take(); len(again) > 0 {
		t.Errorf("field jobs %v ran again although their parts were in the work directory", again)
	}
	sameOutputs(t, sc, wantDir, wantCOG, dir, cog)
}

func TestPipelineCancelledMidway(t *testing.T) {
	// The graph's context cancelled (as SIGINT does) once the first field
	// job has finished: the run stops with an error, and the same run
	// again continues from what was kept and writes the same bytes.
	sc := newScene(t, 200, 64, 1400)
	wantCOG := filepath.Join(t.TempDir(), "whole.tif")
	fr := watchFieldRuns(t)
	wantDir := runPipeline(t, sc, Outputs{COG: wantCOG})
	all := len(fr.take())
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	fr.fail = func(n int) error {
		cancel()
		return nil
	}
	dir, cog := t.TempDir(), filepath.Join(t.TempDir(), "least.tif")
	if err := resumeRun(ctx, t, sc, dir, cog); err == nil {
		t.Fatal("the cancelled run did not fail")
	}
	fr.take()
	kept := jobsOnDisk(dir, sc.plan)
	t.Logf("cancelled: %d of %d field jobs' parts kept", len(kept), all)
	if len(kept) == 0 {
		t.Fatal("the cancelled run kept no field job's parts (the hook cancels after one was written)")
	}
	if err := resumeRun(context.Background(), t, sc, dir, cog); err != nil {
		t.Fatal(err)
	}
	for _, k := range fr.take() {
		if kept[k] {
			t.Errorf("field job %d ran again although its parts were in the work directory", k)
		}
	}
	sameOutputs(t, sc, wantDir, wantCOG, dir, cog)
}
