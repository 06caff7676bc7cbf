// Package render draws the project's results as a PNG map and as a
// self-contained HTML report, offline: no map tiles, no network, no system
// fonts.
//
// # Model
//
// A Scene holds what one command wants to show. Geometry is in WGS84
// longitude/latitude degrees as orb types (orb.Point is [lon, lat]), the same
// as the GeoJSON outputs; polygons follow RFC 7946 (exterior rings
// counter-clockwise, holes clockwise), although the renderer re-orients rings
// itself so a hole is always drawn as a hole. Every point is projected into
// the terrain's local metric frame with terrain.Frame.Forward and from there
// to pixels: the map is a plan view of that tangent plane, x east to the
// right, y north up, one scale for both axes. Grid north of the map and true
// north differ by under 1° within 100 km of the frame origin; the north arrow
// points to true north at the map centre.
//
// Heights are metres (MSL for altitudes, AGL for arrival heights) in the
// Scene; labels are in metres, or feet when Scene.HeightFeet is set. The
// scale bar shows kilometres and nautical miles (1 nm = 1852 m exactly,
// International Hydrographic Organization / ICAO Annex 5).
//
// # Terrain
//
// The background is a hillshade of the DEM by Horn's method (see Hillshade)
// blended with a hypsometric tint of the project's own choosing (see
// palette.go). Flat ground (terrain.Local.Flat) is drawn as an even pale
// tint. Voids (NaN) are drawn in grey and the map beyond the raster in a
// lighter grey; each is named in the legend only when the map shows it.
//
// # Colours
//
// Symbols and lines use the Okabe–Ito palette (M. Okabe and K. Ito, "Color
// Universal Design", 2008), chosen to stay distinguishable under the common
// forms of colour-vision deficiency (deuteranopia, protanopia, tritanopia).
// No meaning is carried by colour alone: reachable fields are filled circles,
// fields out of reach are crosses, proposed fields open rings with a plus;
// route pieces with a field in reach are solid, pieces without are dashed;
// uncovered coverage is hatched. A field beyond the map's edge is drawn at
// the edge with an arrow toward it and its distance beyond the edge.
//
// # Text
//
// Labels use the Go fonts (golang.org/x/image/font/gofont), compiled into the
// binary. Labels are placed greedily, most important first, at the first of
// eight candidate positions around their anchor whose box collides with no
// earlier label or symbol.
//
// Every map and report carries the caution (reach.Caution unless the Scene
// gives its own text); the renderer cannot be asked to leave it out.
package render
