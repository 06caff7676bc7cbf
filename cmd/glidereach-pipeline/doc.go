// Command glidereach-pipeline runs glidereach's tiled emergency-field
// coverage (package glidereach/reach/tiling) as an Apache Beam pipeline with
// Beam's Go SDK: the same job graph — fields → per-field windows → per-tile
// least altitudes → merge by the least altitude per cell → outputs — as
// Beam transforms, so a run too large for one machine can go to a Flink or
// Spark cluster through Beam's portable runner and a job server.
//
// By default it runs on Prism, Beam's embedded local runner, in this
// process: no server, no container. The pipeline test runs it there and
// checks it gives the bytes of the library's local tiled path (tiling.Run).
//
// The command is its own Go module (go.mod here, with glidereach replaced by
// the repository root) so that Beam's module tree (about 0.9 GB unpacked)
// stays out of glidereach's go.mod, its binary and its plain go test ./...
// (DEVELOPERS.md "The pipeline module").
//
// Files: graph.go, the Beam transforms and DoFns; inputs.go, what a worker
// needs to rebuild its inputs; request.go, the flags checked and turned into
// a tiling.Plan and the run described in glidereach coverage --tiled's
// words (reach/plan's describe.go: the FlatGeobuf's description, the COG's
// ImageDescription, the warnings); run.go, the launcher
// (work directory, runner, summary); outputs.go, the finish step's writers
// (summary with the candidates' ranking, COG, FlatGeobuf); parts.go, the
// field jobs' parts kept in the work directory for resuming; workdir.go,
// atomic writes.
//
// The figures are planning aids only: real glide performance depends on
// configuration, propeller, pilot technique, turbulence and sinking air;
// check the aircraft's flight manual; local regulations and licensed
// instruction decide.
package main
