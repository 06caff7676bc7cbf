// Package plan holds glidereach's use cases as library functions with
// typed requests and results: what a command line, a tiled or distributed
// engine, or a test calls to ask "where can this aircraft still land?".
// It sits between the command line and the solvers: cmd → plan → reach →
// {terrain, wind}; it imports neither cobra nor the command's input layer,
// and parses no unit strings.
//
// # Model
//
// Everything is SI: altitudes in metres MSL (true altitude), heights and
// margins in metres, speeds in m/s, masses in kg, temperatures in kelvin;
// positions in degrees (latitude, longitude, WGS84); bearings in degrees
// true, clockwise from north. The solvers work on a local tangent-plane
// window (terrain.Local) read around the question asked.
//
// # What is where
//
// The use cases, each a function of a typed request:
//
//   - reach.go: Reach, the footprint from a start with its fields judged
//     (ReachRequest, ReachResult, StartElevation).
//   - final.go: FinalGlide, the final glide along a line (FinalRequest,
//     FinalResult, FinalWorse).
//   - route.go: Route, the forced-landing options along a planned route
//     (RouteRequest, RouteResult, RouteField).
//   - coverage.go: Coverage, the field coverage of an area or corridor on
//     one grid (CoverageRequest, CoverageResult, Zone).
//   - approach.go: Approach, the pattern to one field (ApproachRequest,
//     ApproachResult, ReadApproachTerrain, CheckApproachDistance).
//
// Their shared pieces:
//
//   - setup.go: Setup, the aircraft and the air of a run (profile,
//     conditions, atmosphere, the forecast wind and the winds a
//     conservative result must hold for, reserve and clearance); its
//     speed-to-fly tables (Table, TableFor, Tables) and the worst-of-winds
//     glide radius (GlideRadius).
//   - ground.go: Ground, the terrain of a run (a DEM source or flat
//     ground), point elevations and window reading (Window around a
//     start, AreaWindow around a box), the plane and pole checks, and the
//     window sizes (MaxWindowSide, MaxAreaCells, …).
//   - window.go: SizeWindow, the window the glides can reach, found by the
//     worst-of-winds rule and corrected once for the lowest ground read.
//   - field.go: Field (a landing field of a request) and FieldResult (a
//     field judged from a start).
//   - failure.go: Failure, the state at an engine failure (its energy
//     credit and the footprint's sector starts).
//   - edge.go: TerrainEdge, where a footprint is cut off by the data's edge.
//   - foreach.go: ForEach, the two-at-a-time runner of independent solver
//     runs.
//   - errors.go: InputError, an error the request caused, naming its field.
//
// # Errors
//
// An error the request caused (a value out of range, a position off the
// terrain data, a profile that cannot fly the conditions) is an
// *InputError whose Field names the request field; a command line maps it
// to its own flag and to its usage exit status. Any other error is a
// failure of the computation, or ctx's error when the run was cancelled.
//
// # Worst of winds
//
// A Setup's Winds are the forecast wind and, with a wind uncertainty, its
// perturbations. Every figure holds in each of them: a footprint keeps per
// cell the lowest arrival (reach.Intersect), a field's required altitude is
// the highest over the winds, a final glide and a route take the case that
// needs the most altitude, and windows are sized for the farthest glide of
// any wind (GlideRadius).
//
// Every result is a planning aid, not navigation guidance (reach.Caution).
package plan
