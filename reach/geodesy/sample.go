package geodesy

import (
	"fmt"
	"math"
)

// MaxSamples bounds the number of samples Sample returns, so a tiny step on
// a long line fails with an error instead of exhausting memory.
const MaxSamples = 10_000_000

// SamplePoint is one point of a polyline sampled by Sample.
type SamplePoint struct {
	Lat, Lon float64 // degrees
	Dist     float64 // m along the polyline from its first vertex (sum of geodesic segment lengths)
	Bearing  float64 // degrees true, [0, 360): direction of travel at this point
	Seg      int     // index i of the segment line[i]→line[i+1] the sample lies on; the last vertex has Seg = len(line)-1
	SegDist  float64 // m from line[Seg] along that segment
}

// Sample walks the polyline line along the geodesic of each segment and
// returns a sample at every distance k·step (k = 0, 1, 2, …, measured from
// the first vertex along the whole line, not restarted at each vertex) and at
// every vertex, in order of distance. A vertex that falls within 1 mm of a
// multiple of step gives one sample, not two; consecutive duplicate vertices
// (zero-length segments) give one sample.
//
// At a vertex the bearing is that of the segment leaving it; at the last
// vertex it is the final bearing of the segment arriving there. A line of one
// point gives one sample with bearing 0.
//
// step is in metres and must be positive and finite. It returns an error for
// an empty line, an invalid coordinate, a nearly antipodal segment
// (ErrNoConvergence, see Inverse), or more than MaxSamples samples.
func Sample(line []LatLon, step float64) ([]SamplePoint, error) {
	if len(line) == 0 {
		return nil, fmt.Errorf("%w: empty line", ErrInvalid)
	}
	if !(step > 0) || math.IsInf(step, 0) {
		return nil, fmt.Errorf("%w: step %v m (want a positive distance)", ErrInvalid, step)
	}
	// Segment lengths and bearings first, so the sample count is known
	// before anything large is allocated.
	type seg struct {
		s, az1, az2 float64
	}
	segs := make([]seg, len(line)-1)
	total := 0.0
	for i := range segs {
		s, az1, az2, err := Inverse(line[i], line[i+1])
		if err != nil {
			return nil, fmt.Errorf("segment %d: %w", i, err)
		}
		segs[i] = seg{s, az1, az2}
		total += s
	}
	if len(line) == 1 {
		if !validLat(line[0].Lat) || !finite(line[0].Lon) {
			return nil, fmt.Errorf("%w: point %v", ErrInvalid, line[0])
		}
		return []SamplePoint{{Lat: line[0].Lat, Lon: normLon(line[0].Lon)}}, nil
	}
	n := total/step + float64(len(line)) + 1
	if n > MaxSamples {
		return nil, fmt.Errorf("%w: %.0f m at a step of %g m gives more than %d samples", ErrInvalid, total, step, MaxSamples)
	}
	const eps = 1e-3 // m: a vertex this close to a step multiple merges with it
	out := make([]SamplePoint, 0, int(n))
	k := 1.0 // next multiple of step to emit
	start := 0.0
	for i, sg := range segs {
		if sg.s == 0 {
			continue // duplicate vertex
		}
		out = append(out, SamplePoint{Lat: line[i].Lat, Lon: normLon(line[i].Lon), Dist: start, Bearing: sg.az1, Seg: i})
		for k*step <= start+eps {
			k++
		}
		end := start + sg.s
		for ; k*step < end-eps; k++ {
			d := k*step - start
			p, az, err := Direct(line[i], sg.az1, d)
			if err != nil {
				return nil, fmt.Errorf("segment %d: %w", i, err)
			}
			out = append(out, SamplePoint{Lat: p.Lat, Lon: p.Lon, Dist: k * step, Bearing: az, Seg: i, SegDist: d})
		}
		start = end
	}
	last := len(line) - 1
	finalAz := 0.0
	for i := len(segs) - 1; i >= 0; i-- {
		if segs[i].s > 0 {
			finalAz = segs[i].az2
			break
		}
	}
	out = append(out, SamplePoint{Lat: line[last].Lat, Lon: normLon(line[last].Lon), Dist: start, Bearing: finalAz, Seg: last})
	return out, nil
}

// Length returns the sum of the geodesic lengths (m) of the segments of line.
// It returns an error under the same conditions as Inverse.
func Length(line []LatLon) (float64, error) {
	total := 0.0
	for i := 0; i+1 < len(line); i++ {
		s, _, _, err := Inverse(line[i], line[i+1])
		if err != nil {
			return 0, fmt.Errorf("segment %d: %w", i, err)
		}
		total += s
	}
	return total, nil
}
