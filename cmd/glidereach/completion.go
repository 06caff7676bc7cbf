package main

import (
	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
)

// newCompletionCmd builds "completion SHELL", which prints the shell
// completion script of the whole command tree (cobra's generators). It
// replaces cobra's default completion command, whose scripts go to the
// writer the root had when the command was made, so tests could not catch
// them; this one writes to the command's own output.
func newCompletionCmd(root *cobra.Command) *cobra.Command {
	return &cobra.Command{
		Use:   "completion bash|zsh|fish|powershell",
		Short: "Print the shell completion script for bash, zsh, fish or PowerShell",
		Long: `completion prints a script that makes the shell complete glidereach's
commands, flags and file names. Load it once in the current shell, or save it
where the shell loads completions at start:

  bash:  source <(glidereach completion bash)
         glidereach completion bash > ~/.local/share/bash-completion/completions/glidereach
         (needs the bash-completion package)
  zsh:   glidereach completion zsh > "${fpath[1]}/_glidereach"   (then start a new shell)
  fish:  glidereach completion fish > ~/.config/fish/completions/glidereach.fish
  PowerShell: glidereach completion powershell | Out-String | Invoke-Expression`,
		Example: `  source <(glidereach completion bash)
  glidereach completion bash > ~/.local/share/bash-completion/completions/glidereach
  glidereach completion zsh > "${fpath[1]}/_glidereach"
  glidereach completion fish > ~/.config/fish/completions/glidereach.fish`,
		ValidArgs:             []string{"bash", "zsh", "fish", "powershell"},
		Args:                  cobra.ExactArgs(1),
		DisableFlagsInUseLine: true,
		RunE: func(cmd *cobra.Command, args []string) error {
			out := cmd.OutOrStdout()
			switch args[0] {
			case "bash":
				return root.GenBashCompletionV2(out, true)
			case "zsh":
				return root.GenZshCompletion(out)
			case "fish":
				return root.GenFishCompletion(out, true)
			case "powershell":
				return root.GenPowerShellCompletionWithDesc(out)
			}
			return input.Usagef("completion", "%q: want bash, zsh, fish or powershell", args[0])
		},
	}
}
