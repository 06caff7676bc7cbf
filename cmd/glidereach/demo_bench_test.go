package main

import (
	"bytes"
	"context"
	"path/filepath"
	"testing"
)

// BenchmarkDemo runs the whole demo (every step, into a temporary folder)
// in process, the demo's landscape made before the timer: what
// `glidereach demo` costs, with the CPU and the time the two Ps idled
// (idle-P-s/op: how well the steps fill both cores, whatever the load of
// other processes).
func BenchmarkDemo(b *testing.B) {
	if _, err := loadDemoScene(); err != nil {
		b.Fatal(err)
	}
	dir := b.TempDir()
	b.ResetTimer()
	defer cpuMeter(b)()
	for i := 0; i < b.N; i++ {
		var out bytes.Buffer
		root := newRootCmd()
		root.SetArgs([]string{"demo", "--out", filepath.Join(dir, "out")})
		root.SetErr(&out)
		if code := exitCode(execute(context.Background(), root, &out)); code != 0 {
			b.Fatalf("demo exit %d\n%s", code, out.String())
		}
	}
}
