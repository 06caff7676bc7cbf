package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestReachBelowReserveLevelsAreWarnings(t *testing.T) {
	// --levels 0m,150m under the 300 m reserve: every output marks those
	// rings as below the reserve, and only the 300 m ring as the reserve.
	dir := t.TempDir()
	html := filepath.Join(dir, "r.html")
	args := []string{"reach", "--from", "10,10", "--alt", "1500m", "--levels", "0m,150m"}
	code, out, errs := cliWithStderr(t, append(args, "--format", "geojson", "--report", html)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var g fc
	if err := json.Unmarshal([]byte(out), &g); err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, f := range g.Features {
		p := f.Properties
		if p["kind"] != "footprint" {
			continue
		}
		n++
		a := p["arrival_agl_m"].(float64)
		below, _ := p["below_reserve"].(bool)
		meaning, _ := p["meaning"].(string)
		if below != (a < 300) || (a < 300) != strings.HasPrefix(meaning, "BELOW THE RESERVE") || (p["is_reserve"] == true) != (a == 300) {
			t.Errorf("level %v m: below_reserve %v, is_reserve %v, meaning %q", a, p["below_reserve"], p["is_reserve"], meaning)
		}
	}
	if n != 3 {
		t.Errorf("%d footprint features, want 3", n)
	}
	code, out, errs = cliWithStderr(t, append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Levels []struct {
			ArrivalAGL   float64 `json:"arrival_agl_m"`
			BelowReserve bool    `json:"below_reserve"`
			Meaning      string  `json:"meaning"`
		} `json:"levels"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, l := range doc.Levels {
		if l.BelowReserve != (l.ArrivalAGL < 300) || l.Meaning == "" {
			t.Errorf("JSON level %+v", l)
		}
	}
	_, out, _ = cliWithStderr(t, args...)
	if !strings.Contains(out, "0 m above ground (BELOW THE RESERVE") || !strings.Contains(out, "300 m above ground (reserve)") {
		t.Errorf("text:\n%s", out)
	}
	h, err := os.ReadFile(html)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(h), "BELOW THE RESERVE") {
		t.Error("report summary does not mark the below-reserve levels")
	}
}
