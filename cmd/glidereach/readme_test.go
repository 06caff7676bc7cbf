package main

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// readmeExample is one glidereach command of the README with what the
// README shows it printing (nil when it shows nothing) and the exit status
// it shows (0 unless an "echo $?" line follows).
type readmeExample struct {
	line int // README line of the command
	cmd  string
	want []string
	code int
}

// readmeBlock is one code block of the README: indented by four spaces or
// fenced with ```.
type readmeBlock struct {
	start int // README line of the block's first line
	lines []string
	fence bool
}

// readmeBlocks splits a Markdown text into its code blocks. List items
// indented by four spaces do not occur in the README's code positions; an
// indented block must follow a blank line.
func readmeBlocks(text string) []readmeBlock {
	var blocks []readmeBlock
	lines := strings.Split(text, "\n")
	for i := 0; i < len(lines); i++ {
		l := lines[i]
		switch {
		case strings.HasPrefix(l, "```"):
			b := readmeBlock{start: i + 2, fence: true}
			for i++; i < len(lines) && !strings.HasPrefix(lines[i], "```"); i++ {
				b.lines = append(b.lines, lines[i])
			}
			blocks = append(blocks, b)
		case strings.HasPrefix(l, "    ") && (i == 0 || strings.TrimSpace(lines[i-1]) == ""):
			b := readmeBlock{start: i + 1}
			for ; i < len(lines) && (strings.HasPrefix(lines[i], "    ") || strings.TrimSpace(lines[i]) == ""); i++ {
				b.lines = append(b.lines, strings.TrimPrefix(lines[i], "    "))
			}
			i--
			for len(b.lines) > 0 && strings.TrimSpace(b.lines[len(b.lines)-1]) == "" {
				b.lines = b.lines[:len(b.lines)-1]
			}
			blocks = append(blocks, b)
		}
	}
	return blocks
}

// readmeExamples finds the README's usage examples. Two forms are checked:
//
//   - a block of "$ glidereach …" lines, each followed by the lines it
//     prints (up to the next "$" line); "$ echo $?" and a number give the
//     exit status of the command before it;
//   - a block of bare "glidereach …" lines (a backslash continues a line):
//     each must exit 0, and when the next thing in the README is a fenced
//     block with no "$" lines, that block is what the block's first command
//     prints.
//
// Blocks of other commands (go test, go run, benchmarks, fuzzing) are not
// examples of the tool and are left out.
func readmeExamples(text string) []readmeExample {
	blocks := readmeBlocks(text)
	var out []readmeExample
	for bi, b := range blocks {
		joined := joinContinued(strings.Join(b.lines, "\n"))
		if len(joined) == 0 {
			continue
		}
		if strings.HasPrefix(joined[0], "$ ") {
			var cur *readmeExample
			for k, l := range joined {
				switch {
				case l == "$ echo $?":
					if cur != nil && k+1 < len(joined) {
						cur.code, _ = strconv.Atoi(strings.TrimSpace(joined[k+1]))
					}
					cur = nil
				case strings.HasPrefix(l, "$ glidereach "):
					out = append(out, readmeExample{line: b.start + k, cmd: strings.TrimPrefix(l, "$ ")})
					cur = &out[len(out)-1]
				case strings.HasPrefix(l, "$ "):
					cur = nil
				case cur != nil:
					cur.want = append(cur.want, l)
				}
			}
			continue
		}
		if !strings.HasPrefix(joined[0], "glidereach ") {
			continue
		}
		first := len(out)
		for k, l := range joined {
			if strings.HasPrefix(l, "glidereach ") {
				out = append(out, readmeExample{line: b.start + k, cmd: l})
			}
		}
		if bi+1 < len(blocks) && blocks[bi+1].fence && followsDirectly(text, b, blocks[bi+1]) {
			nb := blocks[bi+1]
			if len(nb.lines) > 0 && !strings.HasPrefix(nb.lines[0], "$ ") {
				out[first].want = nb.lines
			}
		}
	}
	return out
}

// followsDirectly reports whether only blank lines separate block a from the
// fenced block b in text.
func followsDirectly(text string, a, b readmeBlock) bool {
	lines := strings.Split(text, "\n")
	end := a.start - 1 + len(a.lines) // index after a's last line
	if a.fence {
		end++ // the closing fence
	}
	for i := end; i < b.start-2; i++ {
		if strings.TrimSpace(lines[i]) != "" {
			return false
		}
	}
	return true
}

// matchShown checks what the README shows against the output, line for
// line. A shown line "..." or "…" stands for any number of omitted lines
// (none or more); elsewhere the lines must follow each other as shown, from
// the first output line to the last, so an example that prints three lines
// where the README shows one fails. A shown line ending in "…" matches any
// output line it begins. Trailing blanks and trailing empty lines do not
// count. It returns "" on a match, else the first shown line that could not
// be placed.
func matchShown(want []string, got string) string {
	outLines := strings.Split(strings.TrimRight(got, "\n \t"), "\n")
	for i := range outLines {
		outLines[i] = strings.TrimRight(outLines[i], " \t")
	}
	for len(want) > 0 && strings.TrimSpace(want[len(want)-1]) == "" {
		want = want[:len(want)-1]
	}
	isGap := func(w string) bool { t := strings.TrimSpace(w); return t == "..." || t == "…" }
	lineOK := func(w, o string) bool {
		w = strings.TrimRight(w, " \t")
		if p, ok := strings.CutSuffix(w, "…"); ok {
			return strings.HasPrefix(o, strings.TrimRight(p, " "))
		}
		return o == w
	}
	// ok[i][j]: want[i:] matches outLines[j:].
	n, m := len(want), len(outLines)
	ok := make([][]bool, n+1)
	for i := range ok {
		ok[i] = make([]bool, m+1)
	}
	ok[n][m] = true
	for i := n - 1; i >= 0; i-- {
		for j := m; j >= 0; j-- {
			if isGap(want[i]) {
				ok[i][j] = ok[i+1][j] || (j < m && ok[i][j+1])
			} else {
				ok[i][j] = j < m && lineOK(want[i], outLines[j]) && ok[i+1][j+1]
			}
		}
	}
	if ok[0][0] {
		return ""
	}
	// Name the first shown line that is not in the output at all, else the
	// first line (the order or the count differs).
	for _, w := range want {
		if isGap(w) || strings.TrimSpace(w) == "" {
			continue
		}
		found := false
		for _, o := range outLines {
			found = found || lineOK(w, o)
		}
		if !found {
			return w
		}
	}
	return "(the lines are all there, but not in the order or number shown: " + strings.TrimSpace(want[0]) + " …)"
}

// TestREADMEExamples re-runs the README's usage examples in-process from a
// directory standing for the project's root and compares what they print
// with what the README shows (see readmeExamples and matchShown): the
// README's figures must be what the tool prints today.
func TestREADMEExamples(t *testing.T) {
	text, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	exs := readmeExamples(string(text))
	dir := exampleWorkDir(t)
	shown := 0
	for _, ex := range exs {
		run, err := parseExampleLine(ex.cmd)
		if err != nil {
			t.Errorf("README.md:%d: %v", ex.line, err)
			continue
		}
		code, out, errOut := runExample(t, dir, run)
		if code != ex.code {
			t.Errorf("README.md:%d: %q exits %d, the README says %d\n%s", ex.line, ex.cmd, code, ex.code, errOut)
			continue
		}
		if ex.want == nil {
			continue
		}
		shown++
		if miss := matchShown(ex.want, out+errOut); miss != "" {
			t.Errorf("README.md:%d: %q does not print the README's line\n  %s\nit prints:\n%s%s", ex.line, ex.cmd, miss, out, errOut)
		}
	}
	if len(exs) < 15 || shown < 6 {
		t.Errorf("found %d README examples, %d with shown output: the parser misses some", len(exs), shown)
	}
	t.Logf("%d README examples, %d with their output compared", len(exs), shown)
}

// TestMatchShown checks the README comparison on a made-up output.
func TestMatchShown(t *testing.T) {
	got := "a 1\nb 2   \nc 3\nd 4 and more\n"
	for _, c := range []struct {
		want []string
		miss string
	}{
		{[]string{"a 1", "...", "c 3", "d 4 and more"}, ""},
		{[]string{"...", "b 2", "d 4 …"}, "(the lines are all there, but not in the order or number shown: ... …)"},
		{[]string{"...", "b 2", "c 3", "d 4 …"}, ""},
		{[]string{"a 1", "b 2", "c 3", "d 4 and more", "", ""}, ""},
		{[]string{"a 1", "..."}, ""},
		{[]string{"a 1"}, "(the lines are all there, but not in the order or number shown: a 1 …)"},
		{[]string{"b 3", "..."}, "b 3"},
	} {
		if m := matchShown(c.want, got); m != c.miss {
			t.Errorf("%q: missing %q, want %q", c.want, m, c.miss)
		}
	}
	ex := readmeExamples("x\n\n    $ glidereach terrain a.asc\n    size: 1\n    $ echo $?\n    2\n\n```\n" +
		"glidereach polar --alt 1m \\\n    --mc 1\n```\n\n```\nGeneric\n```\n")
	if len(ex) != 2 || ex[0].code != 2 || len(ex[0].want) != 1 || ex[1].cmd != "glidereach polar --alt 1m      --mc 1" || len(ex[1].want) != 1 {
		t.Errorf("readmeExamples: %+v", ex)
	}
}
