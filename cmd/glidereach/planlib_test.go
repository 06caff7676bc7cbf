package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"testing"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach"
	"glidereach/reach/geodesy"
	"glidereach/reach/plan"
)

// The command prints what the library returns: the same request through
// `reach --format json` and plan.Reach give the same numbers (as the JSON
// rounds them), and `final --format json` and plan.FinalGlide the same
// required altitude. The figures themselves are checked against the
// glide-cone geometry in reach/plan's tests (tan γ = 1/E; Anderson,
// Introduction to Flight, ch. 6).
func TestCommandEqualsLibrary(t *testing.T) {
	ctx := context.Background()
	ac, err := reach.Builtin("trainer")
	if err != nil {
		t.Fatal(err)
	}
	w, err := input.ParseWind("0m:240/10kt,1500m:270/20kt")
	if err != nil {
		t.Fatal(err)
	}
	setup, err := plan.NewSetup(ac, reach.Conditions{}, 0, w, math.NaN(), math.NaN())
	if err != nil {
		t.Fatal(err)
	}

	t.Run("reach", func(t *testing.T) {
		path := writeTestFields(t, -0.5, -24.5, []float64{6000, 9000, 14000}, []float64{60, 250, 0})
		code, out, stderr := runCLI(t, "reach", "--from", "-0.5,-24.5", "--alt", "1500m", "--aircraft", "trainer",
			"--wind", "0m:240/10kt,1500m:270/20kt", "--fields", path, "--format", "json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var doc struct {
			Farthest float64 `json:"farthest_m"`
			Fields   []struct {
				Name      string   `json:"name"`
				Reachable bool     `json:"reachable"`
				Arrival   *float64 `json:"arrival_agl_m"`
				Required  *float64 `json:"required_msl_m"`
			} `json:"fields"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		fs, err := input.LoadFields(path)
		if err != nil {
			t.Fatal(err)
		}
		res, err := plan.Reach(ctx, plan.ReachRequest{Setup: setup, Ground: plan.Ground{}, Lat: -0.5, Lon: -24.5, Alt: 1500, Fields: planFields(fs)})
		if err != nil {
			t.Fatal(err)
		}
		if doc.Farthest != num(res.Farthest) {
			t.Errorf("farthest: command %v, library %v", doc.Farthest, num(res.Farthest))
		}
		if len(doc.Fields) != len(res.Fields) {
			t.Fatalf("%d fields printed, %d returned", len(doc.Fields), len(res.Fields))
		}
		// Not vacuous: the fields lie either side of the footprint's edge
		// (about 10.8 km in still air; the wind moves it).
		n := 0
		for _, f := range res.Fields {
			if f.Reachable {
				n++
			}
		}
		if n == 0 || n == len(res.Fields) || res.Farthest < 5000 {
			t.Fatalf("%d of %d fields reachable, farthest %.0f m: the check compares nothing interesting", n, len(res.Fields), res.Farthest)
		}
		for i, f := range res.Fields {
			d := doc.Fields[i]
			if d.Name != f.Name || d.Reachable != f.Reachable || fmt.Sprint(deref(d.Arrival)) != fmt.Sprint(numDown(f.ArrivalAGLM)) ||
				fmt.Sprint(deref(d.Required)) != fmt.Sprint(numUp(f.RequiredMSL)) {
				t.Errorf("field %d: command %s %v %v %v, library %s %v %v %v", i, d.Name, d.Reachable, deref(d.Arrival), deref(d.Required),
					f.Name, f.Reachable, numDown(f.ArrivalAGLM), numUp(f.RequiredMSL))
			}
		}
	})

	t.Run("final", func(t *testing.T) {
		goal, _, _ := geodesy.Direct(geodesy.LatLon{Lat: -0.5, Lon: -24.5}, 100, 12000)
		code, out, stderr := runCLI(t, "final", "--from", "-0.5,-24.5", "--alt", "2000m", "--aircraft", "trainer",
			"--wind", "0m:240/10kt,1500m:270/20kt", "--to", fmt.Sprintf("%.7f,%.7f@120m", goal.Lat, goal.Lon), "--format", "json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		lat, lon, _ := input.ParseLatLon(fmt.Sprintf("%.7f,%.7f", goal.Lat, goal.Lon))
		res, err := plan.FinalGlide(ctx, plan.FinalRequest{Setup: setup, Ground: plan.Ground{},
			Route: []geodesy.LatLon{{Lat: -0.5, Lon: -24.5}, {Lat: lat, Lon: lon}}, Alt: 2000, GoalElev: 120})
		if err != nil {
			t.Fatal(err)
		}
		if got := fmt.Sprint(doc["required_msl_m"]); got != fmt.Sprint(numUp(res.Glide.Required)) {
			t.Errorf("required: command %s, library %v", got, numUp(res.Glide.Required))
		}
	})
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

// A bad request names a request field in plan; the command names its flag
// (the flags of --help, cmd/glidereach/*.go), with exit status 2.
func TestPlanErrorsNameFlags(t *testing.T) {
	for field, flag := range map[string]string{
		"From": "--from", "Alt": "--alt", "AltIndicated": "--alt-indicated", "AirSink": "--air-sink",
		"MacCready": "--mc", "Terrain": "--terrain", "Aircraft": "--aircraft", "": "",
	} {
		if got := flagOf(field); got != flag {
			t.Errorf("flagOf(%q) = %q, want %q", field, got, flag)
		}
	}
	err := usage(&plan.InputError{Field: "Alt", Err: fmt.Errorf("400 m MSL is not above the terrain")})
	var ue *input.UsageError
	if !errors.As(err, &ue) || ue.Where != "--alt" || exitStatus(err) != exitUsage {
		t.Errorf("usage(InputError Alt) = %#v (exit %d), want a UsageError for --alt, exit 2", err, exitStatus(err))
	}
	// Through a command: a start below the ground.
	root := newRootCmd()
	root.SetArgs([]string{"reach", "--from", "0,0", "--alt", "100m", "--ground", "500m"})
	root.SetErr(io.Discard)
	err = execute(context.Background(), root, io.Discard)
	if exitStatus(err) != exitUsage || err == nil || !strings.HasPrefix(err.Error(), "--alt: ") {
		t.Errorf("error %v (exit %d); want exit 2 naming --alt", err, exitStatus(err))
	}
}
