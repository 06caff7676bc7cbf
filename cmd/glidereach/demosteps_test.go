package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// The demo's steps run two at a time, but their summaries come out in the
// steps' order whatever order they finish in, and the files of each step
// are listed in that order too.
func TestDemoStepsPrintInOrder(t *testing.T) {
	var running, most atomic.Int32
	mk := func(n int, sleep time.Duration) demoStep {
		return demoStep{order: n, name: fmt.Sprintf("s%d", n), run: func(ctx context.Context, d *demoRun) error {
			if r := running.Add(1); r > most.Load() {
				most.Store(r)
			}
			defer running.Add(-1)
			time.Sleep(sleep)
			fmt.Fprintf(d.out, "out %d\n", n)
			d.files = append(d.files, fmt.Sprintf("f%d", n))
			return nil
		}}
	}
	// The first step is the slowest: the second and third finish first.
	steps := []demoStep{mk(1, 150*time.Millisecond), mk(2, 10*time.Millisecond), mk(3, 10*time.Millisecond)}
	var out bytes.Buffer
	d := &demoRun{out: &out, dir: t.TempDir()}
	if err := runDemoSteps(context.Background(), d, steps); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	i1, i2, i3 := strings.Index(text, "out 1"), strings.Index(text, "out 2"), strings.Index(text, "out 3")
	if !(i1 >= 0 && i1 < i2 && i2 < i3) {
		t.Fatalf("summaries out of order:\n%s", text)
	}
	if strings.Join(d.files, ",") != "f1,f2,f3" {
		t.Fatalf("files %v", d.files)
	}
	if most.Load() > 2 {
		t.Fatalf("%d steps ran at once, want at most 2", most.Load())
	}
}

// A failing step stops the demo with its name; the steps before it have
// printed, the ones after it are not printed.
func TestDemoStepsStopAtFailure(t *testing.T) {
	boom := errors.New("boom")
	steps := []demoStep{
		{order: 1, name: "a", run: func(ctx context.Context, d *demoRun) error { fmt.Fprintln(d.out, "out a"); return nil }},
		{order: 2, name: "b", run: func(ctx context.Context, d *demoRun) error { return boom }},
		{order: 3, name: "c", run: func(ctx context.Context, d *demoRun) error { fmt.Fprintln(d.out, "out c"); return nil }},
	}
	var out bytes.Buffer
	err := runDemoSteps(context.Background(), &demoRun{out: &out, dir: t.TempDir()}, steps)
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), `"b"`) {
		t.Fatalf("error %v", err)
	}
	if !strings.Contains(out.String(), "out a") || strings.Contains(out.String(), "out c") {
		t.Fatalf("output:\n%s", out.String())
	}
}

// An interrupted demo returns the interrupt and leaves no temporary file.
func TestDemoInterrupted(t *testing.T) {
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out bytes.Buffer
	root := newRootCmd()
	root.SetArgs([]string{"demo", "--out", dir})
	root.SetOut(&out)
	root.SetErr(&out)
	if err := root.ExecuteContext(ctx); !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want the interrupt", err)
	}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.Contains(e.Name(), "tmp") {
			t.Fatalf("left %s", e.Name())
		}
	}
}

// When one step fails, runDemoSteps returns only after the step running
// beside it has ended, so no step writes into the folder once the command
// has returned (a test's TempDir cleanup raced such a write).
func TestDemoStepsFailureWaitsForRunningSteps(t *testing.T) {
	boom := errors.New("boom")
	var ended atomic.Bool
	steps := []demoStep{
		{order: 1, name: "fails", run: func(ctx context.Context, d *demoRun) error { return boom }},
		// Ignores its context on purpose: a step deep in a solver may not
		// look at it for a while.
		{order: 2, name: "slow", run: func(ctx context.Context, d *demoRun) error {
			time.Sleep(200 * time.Millisecond)
			ended.Store(true)
			return nil
		}},
	}
	err := runDemoSteps(context.Background(), &demoRun{out: &bytes.Buffer{}, dir: t.TempDir()}, steps)
	if !errors.Is(err, boom) {
		t.Fatalf("error %v, want boom", err)
	}
	if !ended.Load() {
		t.Fatal("runDemoSteps returned while a started step was still running")
	}
}

// The same when it is the summary that cannot be written (standard output
// full): the running step ends before the error comes back.
func TestDemoStepsOutputFailureWaitsForRunningSteps(t *testing.T) {
	var ended atomic.Bool
	steps := []demoStep{
		{order: 1, name: "quick", run: func(ctx context.Context, d *demoRun) error { fmt.Fprintln(d.out, "out"); return nil }},
		{order: 2, name: "slow", run: func(ctx context.Context, d *demoRun) error {
			time.Sleep(200 * time.Millisecond)
			ended.Store(true)
			return nil
		}},
	}
	err := runDemoSteps(context.Background(), &demoRun{out: fullWriter{}, dir: t.TempDir()}, steps)
	if err == nil {
		t.Fatal("no error from a full standard output")
	}
	if !ended.Load() {
		t.Fatal("runDemoSteps returned while a started step was still running")
	}
}
