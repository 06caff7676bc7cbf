package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/spf13/cobra"

	"glidereach/cmd/glidereach/input"
)

// exampleRun is one command line taken from an example text: the arguments
// after "glidereach", the file its standard output is redirected to (empty
// when none), and the filter of a "| grep WORD" that follows it.
type exampleRun struct {
	line   string
	args   []string
	stdout string
	grep   string
}

// splitShell splits one command line the way a POSIX shell splits words for
// the examples this project writes: blanks separate words, single and double
// quotes group, a backslash-newline continues the line. It reports an error
// for an unterminated quote, so a broken example fails the test.
func splitShell(s string) ([]string, error) {
	var words []string
	var cur strings.Builder
	inWord := false
	var quote rune
	for _, r := range s {
		switch {
		case quote != 0:
			if r == quote {
				quote = 0
			} else {
				cur.WriteRune(r)
			}
		case r == '\'' || r == '"':
			quote = r
			inWord = true
		case r == ' ' || r == '\t' || r == '\n':
			if inWord {
				words = append(words, cur.String())
				cur.Reset()
				inWord = false
			}
		default:
			cur.WriteRune(r)
			inWord = true
		}
	}
	if quote != 0 {
		return nil, fmt.Errorf("unterminated %c quote in %q", quote, s)
	}
	if inWord {
		words = append(words, cur.String())
	}
	return words, nil
}

// joinContinued joins lines ending in a backslash with the next one.
func joinContinued(text string) []string {
	var lines []string
	var cur string
	for _, l := range strings.Split(text, "\n") {
		l = strings.TrimRight(l, " \t")
		if strings.HasSuffix(l, `\`) {
			cur += strings.TrimSuffix(l, `\`) + " "
			continue
		}
		lines = append(lines, cur+l)
		cur = ""
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return lines
}

// parseExampleLine turns one shell line of an example into a run. It knows
// the few shell forms the examples use: "source <(glidereach …)", a "> FILE"
// redirection and a trailing "| grep WORD". Anything else that is not a
// plain glidereach command is an error, so an example cannot slip past the
// test by being unrunnable.
func parseExampleLine(line string) (exampleRun, error) {
	run := exampleRun{line: strings.TrimSpace(line)}
	s := run.line
	if inner, ok := strings.CutPrefix(s, "source <("); ok {
		s = strings.TrimSuffix(inner, ")")
	}
	if cmd, grep, ok := strings.Cut(s, "|"); ok {
		w, err := splitShell(grep)
		if err != nil {
			return run, err
		}
		if len(w) != 2 || w[0] != "grep" {
			return run, fmt.Errorf("%q: only \"| grep WORD\" is understood after a command", line)
		}
		run.grep = w[1]
		s = cmd
	}
	words, err := splitShell(s)
	if err != nil {
		return run, err
	}
	if len(words) == 0 || words[0] != "glidereach" {
		return run, fmt.Errorf("%q does not start with glidereach", line)
	}
	for i := 1; i < len(words); i++ {
		if words[i] == ">" {
			if i+1 >= len(words) {
				return run, fmt.Errorf("%q: > without a file", line)
			}
			run.stdout = words[i+1]
			i++
			continue
		}
		run.args = append(run.args, words[i])
	}
	return run, nil
}

// exampleWorkDir makes a fresh directory that stands for the project's root
// (testdata/ is linked into it, so example paths resolve as they do for a
// user in a clone) and changes into it for the rest of the test; what the
// examples write lands there.
func exampleWorkDir(t *testing.T) string {
	t.Helper()
	td, err := filepath.Abs(filepath.Join("..", "..", "testdata"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := os.Symlink(td, filepath.Join(dir, "testdata")); err != nil {
		t.Fatal(err)
	}
	t.Chdir(dir)
	return dir
}

// runExample runs one example in-process on a fresh command tree and
// returns its exit status and what it printed on standard output (filtered
// by its grep, when it has one). A redirected standard output is written to
// the named file under the work directory (absolute or "~/" paths are kept
// inside it too).
func runExample(t *testing.T, dir string, run exampleRun) (int, string, string) {
	t.Helper()
	var outb, errb bytes.Buffer
	root := newRootCmd()
	root.SetArgs(run.args)
	root.SetOut(&outb)
	root.SetErr(&errb)
	var err error
	func() {
		defer func() {
			if r := recover(); r != nil {
				t.Fatalf("%s panicked: %v", run.line, r)
			}
		}()
		err = root.Execute()
	}()
	code, out, errOut := exitCodeQuiet(err), outb.String(), errb.String()
	if err != nil {
		errOut += "glidereach: " + err.Error() + "\n"
	}
	if run.stdout != "" {
		name := strings.NewReplacer("~/", "", "${fpath[1]}", "fpath", "$HOME", "home").Replace(run.stdout)
		path := filepath.Join(dir, "redirect", name)
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(out), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if run.grep != "" {
		var kept []string
		for _, l := range strings.Split(out, "\n") {
			if strings.Contains(l, run.grep) {
				kept = append(kept, l)
			}
		}
		out = strings.Join(kept, "\n")
	}
	return code, out, errOut
}

// exitCodeQuiet is exitCode without printing: the examples' messages are
// compared, not shown.
func exitCodeQuiet(err error) int {
	if err == nil {
		return 0
	}
	var ue *input.UsageError
	if errors.As(err, &ue) || isFlagError(err) {
		return 2
	}
	return 1
}

// allCommands lists the command tree, depth first.
func allCommands(c *cobra.Command) []*cobra.Command {
	list := []*cobra.Command{c}
	for _, sub := range c.Commands() {
		list = append(list, allCommands(sub)...)
	}
	return list
}

// TestHelpExamplesRun runs every example of every command's --help from the
// project's root on the files in testdata/ and expects exit status 0: an
// example a newcomer copies must work (common practice, no source).
func TestHelpExamplesRun(t *testing.T) {
	dir := exampleWorkDir(t)
	n := 0
	for _, c := range allCommands(newRootCmd()) {
		if c.Example == "" {
			if c.Runnable() && !c.Hidden && c.Name() != "glidereach" && c.Parent() != nil && c.Parent().Name() != "completion" {
				t.Errorf("%s has no example in its --help", c.CommandPath())
			}
			continue
		}
		for _, line := range joinContinued(c.Example) {
			if strings.TrimSpace(line) == "" {
				continue
			}
			run, err := parseExampleLine(line)
			if err != nil {
				t.Errorf("%s --help: %v", c.CommandPath(), err)
				continue
			}
			n++
			t0 := time.Now()
			code, out, errOut := runExample(t, dir, run)
			// A completion script names the program's completion function.
			if len(run.args) > 0 && run.args[0] == "completion" && !strings.Contains(out, "_glidereach") {
				t.Errorf("%q printed no completion script:\n%.200s", run.line, out)
			}
			t.Logf("%.1f s  %s", time.Since(t0).Seconds(), run.line)
			if code != 0 {
				t.Errorf("%s --help example %q exits %d:\n%s", c.CommandPath(), run.line, code, errOut)
			}
		}
	}
	if n < 10 {
		t.Errorf("only %d help examples found; the parser misses some", n)
	}
	t.Logf("%d help examples ran", n)
}

// TestParseExampleLine checks the example parser on the shell forms it
// accepts and refuses.
func TestParseExampleLine(t *testing.T) {
	r, err := parseExampleLine(`glidereach polar --wind-aloft "3000:2714 6000:2725+05" --track 090`)
	if err != nil || len(r.args) != 5 || r.args[2] != "3000:2714 6000:2725+05" {
		t.Errorf("quoted word: %q, %v", r.args, err)
	}
	r, err = parseExampleLine(`glidereach terrain x.asc --format json | grep elevation_m`)
	if err != nil || r.grep != "elevation_m" || len(r.args) != 4 {
		t.Errorf("grep: %+v, %v", r, err)
	}
	r, err = parseExampleLine(`source <(glidereach completion bash)`)
	if err != nil || strings.Join(r.args, " ") != "completion bash" {
		t.Errorf("source: %+v, %v", r, err)
	}
	r, err = parseExampleLine(`glidereach completion zsh > "${fpath[1]}/_glidereach"`)
	if err != nil || r.stdout != "${fpath[1]}/_glidereach" || len(r.args) != 2 {
		t.Errorf("redirect: %+v, %v", r, err)
	}
	for _, bad := range []string{`go run ./cmd/glidereach demo`, `glidereach terrain x | sort`, `glidereach polar --name "open`} {
		if _, err := parseExampleLine(bad); err == nil {
			t.Errorf("%q: accepted", bad)
		}
	}
	if got := joinContinued("glidereach a \\\n    --b c\nglidereach d"); len(got) != 2 || !strings.Contains(got[0], "--b c") {
		t.Errorf("continuation: %q", got)
	}
}

// TestTerrainJSONRounded checks that the interpolated elevation in
// terrain --format json carries at most one decimal (0.1 m; no DEM is more
// exact than that, common practice, no source) and that the stored extremes
// carry at most three.
func TestTerrainJSONRounded(t *testing.T) {
	code, out, errOut := runCLI(t, "terrain", filepath.Join("..", "..", "testdata", "geotiff", "geo_float32_strip_packbits.tif"), "--at", "0.01234,-25.01234", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var rep map[string]any
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	for key, places := range map[string]float64{"elevation_m": 1, "elevation_min_m": 3, "elevation_max_m": 3, "resolution_m": 2} {
		v, ok := rep[key].(float64)
		scaled := v * math.Pow(10, places)
		if !ok || math.Abs(scaled-math.Round(scaled)) > 1e-6 {
			t.Errorf("%s = %v: want at most %v decimals", key, rep[key], places)
		}
	}
}
