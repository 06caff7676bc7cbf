// Package reach models the glide performance of an aircraft without thrust and
// solves for the ground it can still reach: the forward footprint from a
// position and altitude (Footprint, rings by marching squares), the least
// altitude from which a set of fields is reached (Required), the final glide
// along a line (FinalGlide), and the route and coverage analyses built on
// the backward raster. DEVELOPERS.md describes the solvers' design.
//
// # Units and conventions
//
// Everything is SI: metres, metres per second, kilograms, kelvin, pascal,
// kilograms per cubic metre. Altitudes are geopotential metres above mean sea
// level and are used as pressure altitudes for the standard atmosphere.
// Indicated airspeed (IAS) is taken equal to equivalent airspeed (EAS): no
// instrument, position or compressibility error, which is fair below about
// 150 kt. True airspeed is TAS = IAS/√σ with σ = ρ/ρ₀.
//
// Sink rates are positive downwards. Track bearings in public APIs that take
// degrees say so; the LossModel takes radians clockwise from north. Wind
// components along a track are positive for a tailwind; the cross-track
// component is positive for a wind from the left (pushing the aircraft to the
// right); its sign never changes a speed-to-fly.
//
// # Performance model
//
// An Aircraft carries one Polar: its still-air sink w₀(V) at sea-level
// density ρ₀ and reference mass m₀, with V the equivalent airspeed. At true
// airspeed V, density ratio σ and mass m (k = m/m₀) the sink is
//
//	w(V) = √(k/σ) · w₀(V·√(σ/k)) · (1 + bugs)
//
// because at a fixed lift coefficient both the speed and the sink scale with
// √(W/(ρS)) (Anderson, Introduction to Flight, ch. 6, gliding flight): the
// glide ratio at a given C_L is unchanged, only the speeds move. Contamination
// ("bugs", rain) multiplies the sink by 1 + bugs.
//
// Speeds below the usable minimum — the profile's min_speed, else
// 1.3 × the stall speed, both scaled with √k — are never flown: every optimum
// is clamped into [usable minimum, maximum speed] and the clamp is reported.
//
// The speed-to-fly for a held track maximises G/(w + s + m), where G is the
// ground speed along the track, s the sinking-air allowance and m the
// MacCready setting; the height lost per metre over ground is then
// (w + s)/G. A Table precomputes this over altitude bands and track
// directions so that solvers never optimise in their inner loops.
//
// # Failures
//
// Bad inputs a user can cause (a non-physical polar, speeds out of order)
// are returned as errors prefixed "reach:". Functions documented to take
// validated values do not check them again.
package reach
