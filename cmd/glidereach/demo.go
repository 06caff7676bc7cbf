package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime/pprof"
	"sort"
	"strings"
	"sync"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/plan/demo"
	"glidereach/terrain"
)

func init() {
	register(newDemoCmd)
	registerDemoStep(10, "performance tables of the built-in profiles", demoPolars)
}

// demoStep is one part of the demo. Steps run in increasing order; each
// prints a short summary to d.out and writes its files with d.write.
//
// To add a part, register it from an init function in your own command
// file, e.g. registerDemoStep(20, "footprints", demoFootprints); leave gaps
// in the order numbers so later parts can go in between.
type demoStep struct {
	order int
	name  string
	run   func(ctx context.Context, d *demoRun) error
}

// demoSteps is filled once by registerDemoStep at program start and only
// read afterwards.
var demoSteps []demoStep

func registerDemoStep(order int, name string, run func(ctx context.Context, d *demoRun) error) {
	demoSteps = append(demoSteps, demoStep{order, name, run})
}

// demoRun is what a demo step works with.
type demoRun struct {
	out   io.Writer // the summary on standard output
	dir   string    // the --out directory, created
	files []string  // written so far, relative to dir
}

// write creates dir/name atomically with fn's output and records it.
func (d *demoRun) write(name string, fn func(w io.Writer) error) error {
	path := filepath.Join(d.dir, name)
	if err := writeFileAtomic(path, func(f *os.File) error { return fn(f) }); err != nil {
		return err
	}
	d.files = append(d.files, name)
	return nil
}

// writeBytes writes data as dir/name atomically and records it.
func (d *demoRun) writeBytes(name string, data []byte) error {
	return d.write(name, func(w io.Writer) error { _, err := w.Write(data); return err })
}

// drawBoth writes stem.png and stem.html with a command's map-and-report
// writer and records them.
func (d *demoRun) drawBoth(stem string, draw func(mapPath, reportPath string) error) error {
	if err := draw(filepath.Join(d.dir, stem+".png"), filepath.Join(d.dir, stem+".html")); err != nil {
		return err
	}
	d.files = append(d.files, stem+".png", stem+".html")
	return nil
}

func newDemoCmd() *cobra.Command {
	var dir, terrainFile string
	var seed int64
	cmd := &cobra.Command{
		Use:   "demo [--out DIR]",
		Short: "Run every capability on the built-in fictional scenario and write the results",
		Long: `demo needs no input: it runs each part of the tool on the built-in, invented
scenario (generic aircraft profiles, fictional terrain, fields and wind) and
writes the results into a folder, printing a short summary of each part.
Everything in it is made up for demonstration.

` + wrapText(cautionText, 78),
		Example: `  glidereach demo --out demo-out
  glidereach demo --write-terrain demo-terrain.tif
  glidereach demo --write-terrain other-landscape.tif --seed 7`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if terrainFile != "" {
				if cmd.Flags().Changed("out") {
					return input.Usagef("--write-terrain", "writes only the landscape; leave out --out (or drop --write-terrain to run the demo)")
				}
				return writeDemoTerrain(cmd.OutOrStdout(), terrainFile, seed)
			}
			if cmd.Flags().Changed("seed") {
				return input.Usagef("--seed", "picks the landscape --write-terrain writes; the demo itself runs on seed %d", demoSeed)
			}
			if strings.TrimSpace(dir) == "" {
				return input.Usagef("--out", "is empty")
			}
			if err := os.MkdirAll(dir, 0o755); err != nil {
				return &input.UsageError{Where: "--out", Err: err}
			}
			d := &demoRun{out: cmd.OutOrStdout(), dir: dir}
			steps := append([]demoStep(nil), demoSteps...)
			sort.SliceStable(steps, func(i, j int) bool { return steps[i].order < steps[j].order })
			if err := runDemoSteps(cmd.Context(), d, steps); err != nil {
				return err
			}
			fmt.Fprintf(d.out, "Wrote %d files to %s:\n", len(d.files), dir)
			for _, f := range d.files {
				fmt.Fprintf(d.out, "  %s\n", f)
			}
			fmt.Fprintln(d.out)
			_, err := io.WriteString(d.out, wrapText("Caution: "+reach.Caution, 78))
			return err
		},
	}
	cmd.Flags().StringVar(&dir, "out", "glidereach-demo", "directory to write the results into (created if needed)")
	cmd.Flags().StringVar(&terrainFile, "write-terrain", "", "write the demo's invented landscape as a GeoTIFF `FILE.tif` (usable with --terrain) instead of running the demo")
	cmd.Flags().Int64Var(&seed, "seed", demoSeed, "with --write-terrain: which invented landscape (same layout, other ridges and valleys)")
	return cmd
}

// demoStepCost is the CPU time (s) of each demo step by its order number,
// from a profile of the demo (GLIDEREACH_CPUPROFILE, split by the steps'
// labels; 2026-12-02), used only to start the longest steps first. A step
// not listed counts 0 and starts last.
var demoStepCost = map[int]float64{20: 6.5, 50: 2.5, 40: 1.4, 30: 0.4, 35: 0.35}

// runDemoSteps runs the steps two at a time, the costliest first
// (demoStepCost; they are independent: each writes its own files and its
// summary into its own buffer) and prints each summary, with the files it
// wrote, in the steps' order as soon as it and the ones before it are
// done, so the output is the same whatever the timing. A failure or an
// interrupt stops the steps not yet started and cancels the running ones;
// runDemoSteps returns only when every step it started has ended, so no
// step writes into the folder after the command has returned. The files
// already written stay.
func runDemoSteps(ctx context.Context, d *demoRun, steps []demoStep) error {
	type outcome struct {
		run  *demoRun
		took time.Duration
		err  error
	}
	done := make([]chan outcome, len(steps))
	for i := range done {
		done[i] = make(chan outcome, 1)
	}
	ctx, cancel := context.WithCancel(ctx)
	var running sync.WaitGroup // the dispatcher and every step it started
	defer func() {
		cancel()
		running.Wait()
	}()
	sem := make(chan struct{}, 2)
	// Longest first (by demoStepCost), so the two lanes end together.
	start := make([]int, len(steps))
	for i := range start {
		start[i] = i
	}
	sort.SliceStable(start, func(a, b int) bool {
		return demoStepCost[steps[start[a]].order] > demoStepCost[steps[start[b]].order]
	})
	running.Add(1)
	go func() {
		defer running.Done()
		for n, i := range start {
			s := steps[i]
			select {
			case sem <- struct{}{}:
			case <-ctx.Done():
				for _, j := range start[n:] {
					done[j] <- outcome{err: ctx.Err()}
				}
				return
			}
			running.Add(1)
			go func(i int, s demoStep) {
				defer running.Done()
				defer func() { <-sem }()
				sd := &demoRun{out: &bytes.Buffer{}, dir: d.dir}
				t0 := time.Now()
				err := ctx.Err()
				if err == nil {
					// The step's name labels its CPU samples (and those of
					// the goroutines it starts) in a GLIDEREACH_CPUPROFILE.
					pprof.Do(ctx, pprof.Labels("demo-step", s.name), func(ctx context.Context) {
						err = s.run(ctx, sd)
					})
				}
				done[i] <- outcome{run: sd, took: time.Since(t0), err: err}
			}(i, s)
		}
	}()
	for i, s := range steps {
		o := <-done[i]
		if o.err != nil {
			cancel()
			if errors.Is(o.err, context.Canceled) || errors.Is(o.err, context.DeadlineExceeded) {
				return o.err
			}
			return fmt.Errorf("demo step %q: %w", s.name, o.err)
		}
		fmt.Fprintf(d.out, "== %d. %s\n\n", i+1, s.name)
		if _, err := d.out.Write(o.run.out.(*bytes.Buffer).Bytes()); err != nil {
			return err
		}
		fmt.Fprintf(d.out, "(step %d took %.1f s)\n\n", i+1, o.took.Seconds())
		d.files = append(d.files, o.run.files...)
	}
	return nil
}

// writeDemoTerrain writes the invented landscape of the given seed (the
// demo's own for demoSeed) as a float32 GeoTIFF in EPSG:4326 that --terrain
// and GIS programs read, and prints what it wrote. The file says in its
// ImageDescription that it is invented.
func writeDemoTerrain(w io.Writer, path string, seed int64) error {
	ext := strings.ToLower(filepath.Ext(path))
	if ext != ".tif" && ext != ".tiff" {
		return input.Usagef("--write-terrain", "%q: want a .tif or .tiff file name", path)
	}
	g := terrain.Synthetic(seed, demoCells, demoCells, demoCellDeg)
	desc := fmt.Sprintf("glidereach: invented landscape (synthetic, seed %d, %d x %d cells of 2 arc-seconds), elevation m MSL; not a real place. %s", seed, demoCells, demoCells, reach.Caution)
	if err := writeFileAtomic(path, func(f *os.File) error {
		return terrain.GeoTIFFWriter{Description: desc}.Write(f, g)
	}); err != nil {
		return &input.UsageError{Where: "--write-terrain", Err: err}
	}
	west, north := g.X0-g.DX/2, g.Y0+g.DY/2
	east, south := west+float64(g.Cols)*g.DX, north-float64(g.Rows)*g.DY
	_, err := fmt.Fprintf(w, "Wrote %s: invented landscape (seed %d), %d × %d cells of 2″, EPSG:4326, %.6f..%.6f N, %.6f..%.6f E\n"+
		"Use it with --terrain %s (e.g. glidereach reach --from %.2f,%.2f --agl 1000m --terrain %s).\n",
		path, seed, g.Cols, g.Rows, south, north, west, east, path, terrain.SyntheticLat, terrain.SyntheticLon, path)
	return err
}

// demoPolars prints the key figures of every built-in profile at a few
// altitudes in still air and writes the full tables (text and JSON).
func demoPolars(ctx context.Context, d *demoRun) error {
	tw := tabwriter.NewWriter(d.out, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "profile\taltitude\tbest glide\tat IAS\tTAS\tleast sink\tat IAS\t")
	for _, name := range reach.BuiltinNames() {
		var reps []*polarReport
		for _, alt := range demo.TableAltitudes() {
			ac, err := reach.Builtin(name)
			if err != nil {
				return err
			}
			unit := "kt"
			if name == "sailplane" {
				unit = "km/h" // the full tables in the units sailplane pilots use
			}
			rep := buildPolarReport(&polarOptions{ac: ac, alt: alt, unit: unit})
			reps = append(reps, rep)
			note := ""
			if rep.LeastSink.Clamp != "" {
				note = " (held at min speed)"
			}
			fmt.Fprintf(tw, "%s\t%.0f m\t1:%.1f\t%.0f kt\t%.0f kt\t%.2f m/s\t%.0f kt%s\t\n", name, alt,
				rep.BestGlide.GlideRatio, rep.BestGlide.IAS/input.Knot, rep.BestGlide.TAS/input.Knot,
				rep.LeastSink.Sink, rep.LeastSink.IAS/input.Knot, note)
		}
		if err := d.write("polar-"+name+".txt", func(w io.Writer) error {
			for i, r := range reps {
				if i > 0 {
					io.WriteString(w, "\n\n")
				}
				if err := writePolar(w, r, "text"); err != nil {
					return err
				}
			}
			return nil
		}); err != nil {
			return err
		}
		if err := d.write("polar-"+name+".json", func(w io.Writer) error {
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(reps)
		}); err != nil {
			return err
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(d.out, "\nStill air, ISA, profile mass. Glide ratios do not change with altitude; true speeds")
	fmt.Fprintln(d.out, "and sink rates rise as the air thins. Full tables: polar-NAME.txt / .json.")
	return nil
}
