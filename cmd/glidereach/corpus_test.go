package main

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// corpusEntry is one line of testdata/cli-errors.txt.
type corpusEntry struct {
	line  int
	exit  int
	words []string
	args  []string
	full  bool // ">FULL": standard output fails every write (a full disk)
}

// splitArgs splits at spaces; '...' groups (and may be empty).
func splitArgs(s string) ([]string, error) {
	var out []string
	var cur strings.Builder
	in, have := false, false
	for _, r := range s {
		switch {
		case r == '\'':
			in, have = !in, true
		case r == ' ' && !in:
			if have {
				out = append(out, cur.String())
				cur.Reset()
				have = false
			}
		default:
			cur.WriteRune(r)
			have = true
		}
	}
	if in {
		return nil, fmt.Errorf("unclosed quote")
	}
	if have {
		out = append(out, cur.String())
	}
	return out, nil
}

func readCorpus(t *testing.T, path string) []corpusEntry {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var es []corpusEntry
	sc := bufio.NewScanner(f)
	for n := 1; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		if line == "" || line[0] == '#' {
			continue
		}
		parts := strings.SplitN(line, "|", 3)
		if len(parts) != 3 {
			t.Fatalf("%s:%d: want EXIT | WORDS | ARGUMENTS", path, n)
		}
		code, err := strconv.Atoi(strings.TrimSpace(parts[0]))
		if err != nil {
			t.Fatalf("%s:%d: exit status: %v", path, n, err)
		}
		e := corpusEntry{line: n, exit: code}
		for _, w := range strings.Split(parts[1], ";") {
			if w = strings.TrimSpace(w); w != "" {
				e.words = append(e.words, w)
			}
		}
		args, err := splitArgs(strings.TrimSpace(parts[2]))
		if err != nil {
			t.Fatalf("%s:%d: %v", path, n, err)
		}
		for _, a := range args {
			if a == ">FULL" {
				e.full = true
			} else {
				e.args = append(e.args, a)
			}
		}
		es = append(es, e)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return es
}

// TestCLIErrorCorpus runs every bad invocation of testdata/cli-errors.txt
// in-process: no panic, the exit status wanted, the words wanted in the
// message, and no file left behind (none at all after a usage error, no
// temporary file after any run).
func TestCLIErrorCorpus(t *testing.T) {
	td, err := filepath.Abs("../../testdata")
	if err != nil {
		t.Fatal(err)
	}
	es := readCorpus(t, filepath.Join(td, "cli-errors.txt"))
	if len(es) < 150 {
		t.Errorf("corpus has %d entries, want at least 150", len(es))
	}
	for _, e := range es {
		tmp := t.TempDir()
		fixtures := map[string]bool{"zero.asc": true, "adir.geojson": true}
		os.WriteFile(filepath.Join(tmp, "zero.asc"), []byte("ncols 2\nnrows 2\nxllcorner -25\nyllcorner -1\ncellsize 1\n1 2\n3 4\n"), 0o644)
		for _, n := range []string{"zero.prj", "zero.yaml", "zero.geojson", "zero.tif"} {
			os.Symlink("/dev/zero", filepath.Join(tmp, n))
			fixtures[n] = true
		}
		os.Mkdir(filepath.Join(tmp, "adir.geojson"), 0o755)
		args := make([]string, len(e.args))
		r := strings.NewReplacer("{td}", td, "{fx}", filepath.Join(td, "cli-errors"), "{tmp}", tmp)
		for i, a := range e.args {
			args[i] = r.Replace(a)
		}
		name := fmt.Sprintf("line%d", e.line)
		code, msg := runCorpusEntry(t, args, e.full)
		if code != e.exit {
			t.Errorf("%s: glidereach %s: exit %d, want %d: %s", name, strings.Join(args, " "), code, e.exit, msg)
			continue
		}
		low := strings.ToLower(msg)
		for _, w := range e.words {
			if !strings.Contains(low, strings.ToLower(w)) {
				t.Errorf("%s: glidereach %s: message lacks %q: %s", name, strings.Join(args, " "), w, msg)
			}
		}
		ents, _ := os.ReadDir(tmp)
		for _, en := range ents {
			switch {
			case strings.Contains(en.Name(), ".tmp-"):
				t.Errorf("%s: temporary file %s left behind", name, en.Name())
			case e.exit == exitUsage && !fixtures[en.Name()]:
				t.Errorf("%s: a usage error left %s behind", name, en.Name())
			}
		}
	}
}

// runCorpusEntry runs one command line in-process and returns its exit
// status and the error message; a panic fails the test.
func runCorpusEntry(t *testing.T, args []string, fullStdout bool) (code int, msg string) {
	t.Helper()
	root := newRootCmd()
	root.SetArgs(args)
	root.SetErr(io.Discard)
	var out io.Writer = &bytes.Buffer{}
	if fullStdout {
		out = fullWriter{}
	}
	defer func() {
		if r := recover(); r != nil {
			t.Errorf("glidereach %s panicked: %v", strings.Join(args, " "), r)
			code, msg = -1, "panic"
		}
	}()
	err := execute(context.Background(), root, out)
	if err != nil {
		msg = err.Error()
	}
	return exitStatus(err), msg
}
