package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestDemoWritesFiles(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, out, _ := runCLI(t, "demo", "--out", dir)
	if code != 0 {
		t.Fatalf("demo exit %d\n%s", code, out)
	}
	if !strings.Contains(out, "PLANNING AID ONLY") || !strings.Contains(out, "trainer") {
		t.Errorf("summary lacks the caution or the trainer:\n%s", out)
	}
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, e := range ents {
		seen[e.Name()] = true
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
		if strings.HasSuffix(e.Name(), ".json") {
			b, _ := os.ReadFile(filepath.Join(dir, e.Name()))
			if !json.Valid(b) {
				t.Errorf("%s is not valid JSON", e.Name())
			}
		}
	}
	for _, want := range []string{"polar-trainer.txt", "polar-trainer.json", "polar-sailplane.txt"} {
		if !seen[want] {
			t.Errorf("demo did not write %s", want)
		}
	}
}
