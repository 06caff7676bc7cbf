// Package tiling computes emergency-field coverage of an area of any size at
// the DEM's own resolution, as a job graph of pure functions over
// serialisable values, so that a local worker pool (Run) and a distributed
// engine run the same graph and get the same bytes.
//
// # The job graph
//
//	Plan ──FieldJobs──▶ FieldJob ──RunField──▶ []TilePart ─┐ (keyed by TileID)
//	Plan ──TileJob────▶ TileJob ───────────────────────────┴─▶ MergeTile ──▶ TileResult
//	[]TileResult ──Totals / WriteCOG / Contour──▶ outputs
//
// Step by step:
//
//  1. A Plan is the whole run: the output Lattice (the DEM's own grid and
//     CRS over the area, cut into square tiles of Plan.Tile cells), the
//     fields (reach.Target), the loss models every field must hold in
//     (LossGrid, a sampled reach.Table: [0] the wind, [1:] the other winds
//     of a wind-uncertainty set), clearance, altitude flown and ceiling,
//     and the solver's cell. It is plain data in an explicit, versioned binary
//     encoding (Plan.Encode / DecodePlan, codec.go: the same plan gives the
//     same bytes in every process), and its Digest names a run.
//  2. Plan.FieldJobs gives one FieldJob per field whose glide from the
//     ceiling can touch a tile: the field's own local frame (terrain.Frame
//     tangent at the field), a square window of side 2·(R/Cell + 3) + 1
//     cells where R = reach.GlideRangeBound from the ceiling to the field's
//     elevation plus its reserve (an upper bound on any glide's ground
//     length), at Plan.Cell metres, and the tiles that window touches.
//  3. RunField reads the DEM window (terrain.Source.Window), resamples it
//     to the obstacle surface (terrain.ResampleHigh: the highest DEM sample
//     per solver cell), runs reach.Required for the field alone in every
//     loss model, keeps the worst (highest) least altitude per solver cell,
//     and reads it at the centres of the output cells of each touched tile.
//     The read is conservative: the value at an output cell is the MAXIMUM
//     of the four solver cells around its centre (NaN when any of them has
//     no value), never below the bilinear value reach.RequiredResult's
//     RequiredAt would give there. One TilePart per touched tile that got a
//     value.
//  4. MergeTile (or NewAccumulator + Add + Finish, which it is) takes a
//     TileJob and the TileParts of every field for that tile, in any order,
//     and gives the TileResult: per output cell the least altitude over the
//     fields (ties to the lower field index), the field it leads to, how
//     many fields cover the cell from the altitude flown, and per field the
//     ellipsoidal area of the zone it covers and covers alone in the tile.
//     The merge is commutative and its sums run in cell order within one
//     part, so the result does not depend on the order parts arrive in.
//  5. Totals sums the tiles' areas in tile order; WriteCOG writes the least
//     altitudes as a cloud-optimised GeoTIFF with worst-value overviews;
//     Contour traces the covered and uncovered parts tile by tile with one
//     cell of overlap and joins the pieces into seamless polygons.
//
// A distributed engine maps RunField over Plan.FieldJobs, groups the parts
// by TilePart.Tile, maps MergeTile over the groups (with the TileJob of the
// key, Plan.TileJob), and hands the TileResults to the writers. The work
// files and the values on those edges have an explicit binary encoding
// (Plan.Encode, TilePart.Encode, TileResult.Encode: magic, kind, version,
// little-endian fields, CRC-32), byte-identical across processes; the
// decoders refuse truncated or damaged input (ErrCorrupt). FieldJob and
// TileJob are plain data too (the Beam pipeline gob-encodes them; they are
// never compared as bytes).
//
// # Units and conventions
//
// Lattice coordinates are those of the DEM's CRS (degrees for EPSG:4326,
// metres for UTM); output cell (c, r) is column c east, row r south, from
// the north-west cell (0, 0), as terrain.Grid. Altitudes are metres MSL;
// areas m² on the WGS84 ellipsoid (CellArea). NaN least altitude means no
// field is reached from below the ceiling. The solver cell is the DEM's
// resolution (never silently coarser; a Plan with a coarser Cell says so
// in Plan.Notes).
//
// The figures are planning aids only (reach.Caution).
package tiling
