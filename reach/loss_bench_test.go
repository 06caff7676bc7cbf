package reach

import (
	"math"
	"math/rand/v2"
	"testing"
)

// glideSample is one segment lookup of the solver's hot path: a start (or,
// backward, end) altitude h (m MSL), a travel vector (dx, dy) and a ground
// length L (m).
type glideSample struct{ h, dx, dy, L float64 }

// benchDescent returns the descent table the footprint benchmarks' solver
// uses (benchSetup's sailplane in three wind layers, tabulated over
// 0–1900 m) and 4096 seeded lookups whose arrival (and departure) lies in
// the table: altitudes 300–1800 m, every bearing, lengths up to most of
// what the altitude allows (as the solver's segments from a source to the
// wavefront; a fifth are single cells of 30 m, as its bends are).
func benchDescent(b *testing.B) (*descent, []glideSample) {
	b.Helper()
	_, tab := benchSetup(b, 16)
	d, err := newDescent(tab, 0, 1900, 10, 360)
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(7, 11))
	var out []glideSample
	for len(out) < 4096 {
		h := 300 + 1500*rng.Float64()
		th := 2 * math.Pi * rng.Float64()
		L := 30.0
		if rng.IntN(5) != 0 {
			L = (h - 50) * 20 * rng.Float64()
		}
		s := glideSample{h, math.Sin(th), math.Cos(th), L}
		a := d.arriveVec(s.h, s.dx, s.dy, s.L)
		if math.IsInf(a, 0) || math.IsInf(d.departVec(a, s.dx, s.dy, s.L), 0) {
			continue
		}
		out = append(out, s)
	}
	return d, out
}

// BenchmarkArriveVec: ns per forward segment lookup (descent.arriveVec:
// the direction split, two columns, their blend), lookups independent of
// each other (the processor may overlap them).
func BenchmarkArriveVec(b *testing.B) {
	d, ss := benchDescent(b)
	x := 0.0
	for i := 0; b.Loop(); i++ {
		s := &ss[i&4095]
		x += d.arriveVec(s.h, s.dx, s.dy, s.L)
	}
	_ = x
}

// BenchmarkArriveVecChain is BenchmarkArriveVec with each lookup's
// altitude depending on the one before (by 10⁻³⁰ of it), as the solver's
// next step depends on the value just found: the latency of a lookup.
func BenchmarkArriveVecChain(b *testing.B) {
	d, ss := benchDescent(b)
	x := 0.0
	for i := 0; b.Loop(); i++ {
		s := &ss[i&4095]
		x = d.arriveVec(s.h+1e-30*x, s.dx, s.dy, s.L)
	}
	_ = x
}

// BenchmarkDepartVec: ns per backward segment lookup (descent.departVec).
func BenchmarkDepartVec(b *testing.B) {
	d, ss := benchDescent(b)
	ends := make([]float64, len(ss))
	for k, s := range ss {
		ends[k] = d.arriveVec(s.h, s.dx, s.dy, s.L)
	}
	x := 0.0
	for i := 0; b.Loop(); i++ {
		s := &ss[i&4095]
		x += d.departVec(ends[i&4095], s.dx, s.dy, s.L)
	}
	_ = x
}
