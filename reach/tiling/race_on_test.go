//go:build race

package tiling

// raceEnabled reports that the tests run under the race detector
// (go test -race), which makes the solvers 5-20 times slower.
const raceEnabled = true
