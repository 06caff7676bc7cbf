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

	"glidereach/cmd/glidereach/input"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	err := newRootCmd().ExecuteContext(ctx)
	stop()
	os.Exit(exitCode(err))
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
