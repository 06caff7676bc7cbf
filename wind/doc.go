// Package wind describes the wind and the air temperature by altitude: a
// Profile of layers, each an altitude (m MSL), the direction the wind blows
// FROM (degrees true, clockwise from north), a speed (m/s) and optionally a
// temperature (kelvin).
//
// # Frame and conventions
//
// All values are SI. Directions in Layer are meteorological: 270 is a wind
// from the west, moving the air towards the east. The velocity of the air,
// as returned by At, is the opposite vector, in east/north components:
//
//	east  = -speed · sin(dir)
//	north = -speed · cos(dir)
//
// Components resolves that velocity on a held track of bearing τ (degrees
// true):
//
//	along = east·sin τ + north·cos τ    (> 0: tailwind, < 0: headwind)
//	cross = east·cos τ − north·sin τ    (> 0: wind from the LEFT of the track,
//	                                     pushing the aircraft to the right)
//
// # Interpolation and edges
//
// Between two layers the east and north components are interpolated
// linearly in altitude — not direction and speed separately — so a wind
// that veers through 180° between two layers of equal speed passes through
// calm half-way, as the vector mean of the two does. Below the lowest layer
// and above the highest the wind is that of the end layer (constant).
//
// Temperatures given with layers override the standard atmosphere: between
// layers that carry one, the temperature is interpolated linearly; beyond
// the lowest and highest of them it follows the ICAO standard atmosphere's
// lapse with the deviation from ISA of the nearest such layer. Where no layer
// carries a temperature, the temperature is ISA plus the caller's deviation.
// Altitudes are taken as geopotential for the ISA formula (the difference
// from geometric height is 0.2 % at 11 km).
//
// # Validation
//
// NewProfile refuses an empty list, non-finite values, altitudes outside
// −1000…30 000 m, altitudes that are not strictly increasing (duplicates and
// unsorted input are both refused: an out-of-order layer is most often a
// typing error, so it is reported rather than silently sorted), directions
// outside 0…360, speeds below 0 or above MaxSpeed (120 m/s, about 233 kt),
// and temperatures outside 150…350 K. The error is a *LayerError naming the
// layer; its Err is one of the sentinel errors of this package.
//
// The package parses no text: unit strings, inline specifications, files and
// coded forecasts are read by the command line's input layer.
package wind
