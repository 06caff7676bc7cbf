// Command glidereach computes where an aircraft without thrust can still land:
// glide footprints over terrain and through layered wind, final glides, route
// forced-landing gaps and emergency-field coverage. It is a planning aid, not
// navigation guidance.
package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"runtime/pprof"

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
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	err := newRootCmd().ExecuteContext(ctx)
	stop()
	code := exitCode(err)
	pprof.StopCPUProfile()
	os.Exit(code)
}

// exitCode maps an error to the process exit status of the command-line
// contract: 0 success, 2 usage or input error, 1 anything else. It prints the
// error on stderr.
func exitCode(err error) int {
	if err == nil {
		return 0
	}
	fmt.Fprintln(os.Stderr, "glidereach:", err)
	var ue *input.UsageError
	if errors.As(err, &ue) || isFlagError(err) {
		return 2
	}
	return 1
}
