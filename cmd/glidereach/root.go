package main

import (
	"errors"
	"runtime/debug"
	"strings"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
)

// version is set at link time with -ldflags "-X main.version=..."; otherwise
// it is taken from the build information.
var version = ""

func buildVersion() string {
	if version != "" {
		return version
	}
	if bi, ok := debug.ReadBuildInfo(); ok && bi.Main.Version != "" && bi.Main.Version != "(devel)" {
		return bi.Main.Version
	}
	return "dev"
}

// newRootCmd builds the whole command tree. Every command is built by its own
// constructor with local flag variables; nothing is package-level state.
func newRootCmd() *cobra.Command {
	root := &cobra.Command{
		Use:   "glidereach",
		Short: "Where can an aircraft without thrust still land?",
		Long: `glidereach turns an altitude, an aircraft's glide polar, wind by altitude and
terrain into the ground that can still be reached with a reserve height.

` + cautionText,
		Version:       buildVersion(),
		SilenceUsage:  true,
		SilenceErrors: true,
		Example: `  glidereach polar --aircraft trainer --alt 5000ft
  glidereach reach --from -0.5,-24.5 --alt 1500m --aircraft trainer`,
	}
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return &input.UsageError{Err: err}
	})
	for _, newCmd := range commands {
		root.AddCommand(newCmd())
	}
	root.CompletionOptions.DisableDefaultCmd = true
	root.AddCommand(newCompletionCmd(root))
	// cobra's own help command gets examples too.
	root.InitDefaultHelpCmd()
	for _, c := range root.Commands() {
		if c.Name() == "help" {
			c.Example = `  glidereach help reach
  glidereach help final`
			// cobra's help prints "Unknown help topic" and succeeds; an
			// unknown topic is a usage error like an unknown command.
			c.RunE = func(c *cobra.Command, args []string) error {
				target, rest, err := c.Root().Find(args)
				if err != nil || target == nil || len(rest) > 0 || (len(args) > 0 && target == c.Root()) {
					return input.Usagef("help", "unknown help topic %q (see glidereach --help)", strings.Join(args, " "))
				}
				target.InitDefaultHelpFlag()
				return target.Help()
			}
			c.Run = nil
		}
	}
	return root
}

// commands lists the constructors of the subcommands; each command file
// registers its constructor in an init function of that file.
var commands []func() *cobra.Command

func register(newCmd func() *cobra.Command) { commands = append(commands, newCmd) }

// isFlagError reports whether err comes from cobra's own argument and flag
// checks (unknown command, wrong number of arguments, required flags), which
// are usage errors.
func isFlagError(err error) bool {
	var ue *input.UsageError
	if errors.As(err, &ue) {
		return true
	}
	msg := err.Error()
	for _, p := range []string{"unknown command", "unknown flag", "unknown shorthand", "required flag", "accepts ", "requires at least", "requires at most", "flag needs an argument", "invalid argument", "if any flags in the group", "none of the others can be", "at least one of the flags"} {
		if strings.Contains(msg, p) {
			return true
		}
	}
	return false
}
