package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"os"
	"os/signal"
	"syscall"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	beamlog "github.com/apache/beam/sdks/v2/go/pkg/beam/log"
	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"

	// The runners a run may name with --runner (registered by import):
	// prism, the embedded local runner and the default; universal, any
	// portable job server; flink and spark, the same against those job
	// servers.
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/flink"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/spark"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/universal"
	// The reflection-free runtime for the registered DoFns.
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/core/runtime/exec/optimized"
)

// Exit statuses (the same contract as glidereach: README "Exit status").
const (
	exitOK          = 0
	exitFailure     = 1   // a failed pipeline, a failed write
	exitUsage       = 2   // a usage or input error
	exitInterrupted = 130 // stopped by SIGINT or SIGTERM
)

func main() {
	// SIGINT and SIGTERM cancel ctx: the run stops; the field runs and
	// tiles already finished stay in the work directory for the next run
	// to continue from.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	root := newRootCmd()
	root.SetOut(os.Stdout)
	err := root.ExecuteContext(ctx)
	code := exitCode(ctx, err, os.Stderr) // before stop, which cancels ctx
	stop()
	os.Exit(code)
}

// exitCode prints err (if any) on w and returns the exit status for it.
func exitCode(ctx context.Context, err error, w io.Writer) int {
	if err == nil {
		return exitOK
	}
	fmt.Fprintln(w, "glidereach-pipeline:", err)
	var ue *input.UsageError
	switch {
	case ctx.Err() != nil:
		return exitInterrupted
	case errors.As(err, &ue) || isFlagError(err):
		return exitUsage
	}
	return exitFailure
}

// flagError marks cobra's own flag-parsing errors (unknown flag, bad value).
type flagError struct{ error }

func (e flagError) Unwrap() error { return e.error }

func isFlagError(err error) bool {
	var fe flagError
	return errors.As(err, &fe)
}

func newRootCmd() *cobra.Command {
	o := newOptions()
	cmd := &cobra.Command{
		Use:   "glidereach-pipeline --fields FILE (--area FILE | --box LAT,LON,LAT,LON | --corridor ROUTE,WIDTH) (--alt ALT | --agl HEIGHT) --work-dir DIR [--runner prism]",
		Short: "glidereach's tiled emergency-field coverage as an Apache Beam pipeline",
		Long: `glidereach-pipeline computes the emergency-field coverage of an area as
glidereach's tiled engine does — every field's backward glide run on the
window its glide from the ceiling can reach, at the DEM's resolution, merged
by the least altitude per cell — but as an Apache Beam pipeline, so that a
run too large for one machine can be spread over a Flink or Spark cluster.

By default the pipeline runs in this process on Beam's embedded local runner
(Prism): no server, no container. --runner universal (or flink, spark) with
--endpoint HOST:PORT submits it to a Beam job server instead (README
"Distributed runs"): the DEM files, the area file and --work-dir must then be
on a filesystem every worker mounts at the same path.

The work directory holds the run's field-run parts and tiles; a run given
the directory of an interrupted run of the same inputs continues from the
field runs and tiles it finished, and gives the same bytes as an
uninterrupted one. The outputs are the least-altitude raster (--cog, a
cloud-optimised GeoTIFF with worst-value overviews), the covered and
uncovered parts as FlatGeobuf (--fgb) and a JSON summary (--summary, and
summary.json in the work directory). --candidates ranks candidate fields
by the area each would add and chooses --pick of them, as glidereach
coverage --tiled does.

` + reach.Caution,
		Example: `  glidereach-pipeline --fields fields.geojson --box -0.8,-24.85,-0.15,-24.15 --alt 1500m \
      --terrain dem.tif --work-dir run1 --cog least.tif --summary summary.json
  glidereach-pipeline ... --runner universal --endpoint localhost:8099 \
      --environment_type DOCKER --environment_config apache/beam_go_sdk:2.77.0`,
		Args:          cobra.NoArgs,
		SilenceUsage:  true,
		SilenceErrors: true,
		RunE: func(cmd *cobra.Command, args []string) error {
			// In worker mode (a cluster's SDK container starts this binary
			// with --worker) beam.Init runs the worker and exits.
			switch o.logLevel {
			case "off", "debug", "info", "warn", "error":
			default:
				return input.Usagef("--beam-log-level", "%q: want off, debug, info, warn or error", o.logLevel)
			}
			quiet := o.logLevel == "off"
			if !quiet {
				beamlog.LogLevel = o.logLevel
			}
			beam.Init()
			if quiet {
				// Beam's and Prism's progress lines go to slog's default
				// logger; a failure is reported once, as the error.
				slog.SetDefault(slog.New(slog.DiscardHandler))
			}
			return run(cmd.Context(), o, cmd.OutOrStdout(), cmd.ErrOrStderr())
		},
	}
	cmd.SetFlagErrorFunc(func(_ *cobra.Command, err error) error { return flagError{err} })
	fs := cmd.Flags()
	o.register(fs)
	// Beam's own options (--runner, --endpoint, --environment_type, …, and
	// the worker's --worker, --id, …) live in the standard flag set; the
	// worker's are hidden (a cluster's SDK container passes them), the
	// others say they are Beam's.
	fs.AddGoFlagSet(flag.CommandLine)
	flag.CommandLine.VisitAll(func(f *flag.Flag) {
		pf := fs.Lookup(f.Name)
		if pf == nil {
			return
		}
		switch f.Name {
		case "worker", "id", "logging_endpoint", "control_endpoint", "semi_persist_dir", "options":
			pf.Hidden = true
		default:
			pf.Usage = "Beam option: " + pf.Usage
		}
	})
	if e := fs.Lookup("endpoint"); e != nil {
		e.Usage = "Beam option: the job server, HOST:PORT (with --runner universal, flink or spark; Prism needs none)"
	}
	if r := fs.Lookup("runner"); r != nil {
		r.Usage = "Beam option: the runner: prism (the embedded local runner, the default), universal (any portable job server at --endpoint), flink, spark"
	}
	return cmd
}
