package wind

import (
	"fmt"
	"math"
)

// Perturb returns the scenario set for a wind known to within ±dirErrDeg
// (degrees) in direction and ±speedErr (m/s) in speed, for a conservative
// footprint that keeps, per cell, the worst arrival over all scenarios.
//
// The set is the 3×3 grid of direction offsets {0, −d, +d} and speed offsets
// {0, −s, +s}, applied to every layer alike (the forecast error is taken as
// correlated through the height of the glide). The first profile is always
// p itself (the nominal); the others follow in the order
//
//	(0,−s) (0,+s) (−d,0) (−d,−s) (−d,+s) (+d,0) (+d,−s) (+d,+s)
//
// Offsets that are zero are not repeated, so Perturb(p, 0, 0) is just [p],
// Perturb(p, d, 0) has 3 members and Perturb(p, d, s) has 9. The grid holds
// the nominal-direction cases because the strongest head- or tailwind on a
// track lies inside the direction interval whenever the track is within d of
// the wind line; the four corners alone would miss it.
//
// Perturbed speeds are clamped to 0..MaxSpeed and directions wrapped into
// 0..360. Temperatures are kept. A calm layer keeps its stored direction
// (north) when its speed is raised: the direction of a light and variable
// wind is unknown, and this set does not cover all directions for it.
//
// dirErrDeg must be in 0..180 and speedErr in 0..MaxSpeed, finite (the
// command line's ParseWindError guarantees it); other values are a
// programming error and panic.
func Perturb(p *Profile, dirErrDeg, speedErr float64) []*Profile {
	if !(dirErrDeg >= 0 && dirErrDeg <= 180) || !(speedErr >= 0 && speedErr <= MaxSpeed) {
		panic(fmt.Sprintf("wind: Perturb: direction error %v (want 0..180) or speed error %v (want 0..%v) out of range", dirErrDeg, speedErr, MaxSpeed))
	}
	dirs := offsets(dirErrDeg)
	speeds := offsets(speedErr)
	out := make([]*Profile, 0, len(dirs)*len(speeds))
	for _, dd := range dirs {
		for _, ds := range speeds {
			if dd == 0 && ds == 0 {
				out = append(out, p)
				continue
			}
			out = append(out, p.shifted(dd, ds))
		}
	}
	return out
}

// offsets returns {0, −e, +e}, or {0} for e == 0.
func offsets(e float64) []float64 {
	if e == 0 {
		return []float64{0}
	}
	return []float64{0, -e, e}
}

// shifted returns p with every direction rotated by dd degrees and every
// speed changed by ds m/s (clamped).
func (p *Profile) shifted(dd, ds float64) *Profile {
	ls := p.Layers()
	for i := range ls {
		d := math.Mod(ls[i].Dir+dd, 360)
		if d < 0 {
			d += 360
		}
		ls[i].Dir = d
		ls[i].Speed = math.Min(MaxSpeed, math.Max(0, ls[i].Speed+ds))
	}
	q, err := NewProfile(ls)
	if err != nil {
		panic("wind: Perturb: " + err.Error()) // cannot happen: inputs validated, outputs clamped
	}
	return q
}
