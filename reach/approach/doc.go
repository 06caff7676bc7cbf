// Package approach plans the landing pattern to one field after an engine
// failure: it picks the landing direction, builds the pattern backward from
// the aim point through the wind layers (final, base, downwind, entry), and
// joins it forward from the aircraft's state, with the shortened variants
// when the aircraft is low and holding circles or a longer downwind when it
// is high.
//
// # Frame, units and conventions
//
// SI throughout. Positions are worked in the east/north plane tangent to
// the WGS84 ellipsoid at the field (terrain.Frame): straight legs are
// straight lines there, and over the few tens of kilometres of a join its
// scale error is below 1e-4. Directions are degrees true, clockwise from
// north, in the public types; a landing direction is the track flown on
// final (a landing "into 270" flies west). Heights above the field are the
// heights a pattern is flown to; altitudes are metres MSL. Speeds in the
// pattern are the approach speed (IAS, converted to TAS with the density at
// each altitude); the join glide flies the speed to fly for the track
// (reach.Aircraft.SpeedToFly).
//
// # The pattern, built backward
//
// From the aim point A (on the field, AimDistance past the threshold of a
// strip) the final runs back FinalLength along the landing direction to the
// final gate F; the base leg runs Spacing to the pattern side to the base
// gate B; the downwind runs from the entry gate E abeam A (plus any
// extension) to B. Gates are the corners; legs are straight lines between
// them, which is longer than the rounded path actually flown, so the height
// they need is on the high side. Each leg's height loss is integrated from
// its end to its start,
//
//	dh/ds = (w(V, ρ(h)) + s)/G(h),  G = √(V² − W_c²) + W_t
//
// at the approach speed V through the wind at each altitude (RK4 in steps
// of at most 50 m). Each corner adds the height of the turn between the two
// legs' headings (transition.Turn at the pattern's bank). The final is
// planned at least FinalHeight above the field after the turn onto it, and
// with its clean-glide height increased by Margin: that excess is what the
// airbrakes, flaps or a slip take off at the end.
//
// # Joined forward
//
// From the aircraft's state (transition.Failure: reaction, energy trade,
// turn) the glide flies at the speed to fly to the join point and turns onto
// the pattern. Too high at the entry: whole circles over the entry gate
// (holding), then a longer downwind for the rest. Too low: in order, a
// shorter downwind (joined part way along it), straight to base (joined on
// the base leg), straight in (a final of at least FinalLength); the first
// that holds is the plan. Terrain is checked under every leg: the join glide
// keeps the en-route clearance (tapering to the height above the field near
// it), the pattern keeps Params.Clearance, and the ground under the final
// must stay below the approach path.
package approach
