// Package transition models the first seconds after an engine failure and
// the turns of a glide: the reaction segment flown on the old heading, the
// energy trade from the failure speed down to the glide speed, and steady
// banked turns with their height loss, radius and wind drift.
//
// # Units and conventions
//
// SI throughout: metres, seconds, m/s. Positions are displacements in a
// local east/north plane (metres). Headings and tracks are radians clockwise
// from true north in the math functions and degrees true where a name ends
// in Deg. A positive turn angle is a turn to the right. Wind is the air's
// velocity (east, north), the direction it moves towards, as
// wind.Profile.At returns it. Sink rates are positive downwards. Speeds are
// true airspeeds (TAS) unless a name says IAS; the energy height uses TAS
// because kinetic energy is ½·m·V_true².
//
// # Model
//
// Failure → reaction (time t_r on the heading at the failure speed, sinking
// at the polar's sink for that speed) → energy trade (slow down to the glide
// speed on the heading, crediting η·(V₁² − V₂²)/(2g) of height) → turn at
// bank φ onto the heading that makes good the wanted track → straight glide.
// Each stage drifts with the wind for its duration.
//
// References: the energy height h_E = h + V²/(2g) and the steady level-turn
// relations n = 1/cos φ, r = V²/(g·tan φ), ω = g·tan φ/V are those of
// J. D. Anderson, Introduction to Flight (McGraw-Hill), ch. 6, "Elements of
// airplane performance" — the sections on energy height and on turning
// flight (chapter from memory; section numbers vary by edition). The sink
// at constant lift coefficient, w_φ = w₀·n^{3/2} at V₀·√n, is the bank-angle
// table method of Welch, Welch and Irving, The Complete Soaring Pilot's
// Handbook (as quoted on the St Olaf College soaring pages).
package transition
