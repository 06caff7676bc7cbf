// Package fgb writes FlatGeobuf files: the open binary vector format of
// https://flatgeobuf.org (specification v3: header.fbs and feature.fbs of
// the format's repository), which GDAL/OGR and desktop GIS open natively
// and read feature by feature, so national coverage polygons with millions
// of vertices stay usable where GeoJSON grows unwieldy.
//
// A file is the magic bytes "fgb\x03fgb\x00", the header (a size-prefixed
// FlatBuffers table: name, envelope, geometry type, columns, feature count,
// index node size 0 = no spatial index, CRS by EPSG code, title,
// description), then each feature as a size-prefixed FlatBuffers table
// (geometry: flat xy coordinates with ring ends, parts for multi-polygons;
// properties: a byte buffer of (uint16 column index, value) pairs, strings
// as uint32 length + UTF-8, doubles as 8 bytes little endian). The optional
// packed Hilbert R-tree index is not written: readers scan the features.
//
// The package hand-writes the FlatBuffers encoding (builder.go) so the
// library needs no generated code or further module. It lives under
// reach/tiling because the tiled coverage is what writes national-scale
// polygons; it imports orb only, so any command can use it.
package fgb
