// Command glidereach computes where an aircraft without thrust can still land:
// glide footprints over terrain and through layered wind, final glides, route
// forced-landing gaps and emergency-field coverage. It is a planning aid, not
// navigation guidance.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/pprof"
	"syscall"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
)

func main() {
	// GLIDEREACH_CPUPROFILE=file writes a CPU profile of the run (for
	// developers measuring the solvers; see DEVELOPERS.md).
	if path := os.Getenv("GLIDEREACH_CPUPROFILE"); path != "" {
		if f, err := os.Create(path); err == nil {
			pprof.StartCPUProfile(f)
			defer pprof.StopCPUProfile()
		}
	}
	// SIGINT and SIGTERM cancel ctx: the solvers and the output writers
	// stop, temporary files are removed, and the run exits 130.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	err := execute(ctx, newRootCmd(), os.Stdout)
	stop()
	code := exitCode(err)
	pprof.StopCPUProfile()
	os.Exit(code)
}

// execute runs root with its standard output on stdout and reports a failed
// write there (a full disk, /dev/full, a closed pipe) as an error even when
// the command itself printed with fmt.Fprintf and ignored it.
func execute(ctx context.Context, root *cobra.Command, stdout io.Writer) error {
	ew := &errWriter{w: stdout}
	root.SetOut(ew)
	err := root.ExecuteContext(ctx)
	if err == nil && ew.err != nil {
		err = &writeFailure{fmt.Errorf("standard output: %w", ew.err)}
	}
	return err
}

// Exit statuses of the command-line contract (README "Exit status").
const (
	exitOK          = 0
	exitFailure     = 1   // a runtime failure: a failed write, a solver error
	exitUsage       = 2   // a usage or input error
	exitInterrupted = 130 // stopped by SIGINT or SIGTERM (128 + SIGINT)
)

// exitCode maps an error to the process exit status of the command-line
// contract: 0 success, 130 interrupted by a signal, 1 a failed write, 2 a
// usage or input error, 1 anything else. It prints the error on stderr.
func exitCode(err error) int {
	code := exitStatus(err)
	switch {
	case code == exitInterrupted:
		fmt.Fprintln(os.Stderr, "glidereach: interrupted")
	case err != nil:
		fmt.Fprintln(os.Stderr, "glidereach:", err)
	}
	return code
}

// exitStatus is the exit status of err, without printing it.
func exitStatus(err error) int {
	if err == nil {
		return exitOK
	}
	if errors.Is(err, context.Canceled) {
		return exitInterrupted
	}
	var wf *writeFailure
	if errors.As(err, &wf) {
		return exitFailure
	}
	var ue *input.UsageError
	if errors.As(err, &ue) || isFlagError(err) {
		return exitUsage
	}
	return exitFailure
}
