package reach

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Polar is an aircraft's still-air sink polar at sea-level density
// (ρ₀ = 1.225 kg/m³) and reference mass: Sink(v) = w₀(v), the sink rate in m/s
// (positive down) at equivalent airspeed v in m/s. Aircraft scales it to any
// density, mass and contamination.
//
// Implementations must be smooth and convex in v over the usable range (the
// optimisers rely on a single optimum) and safe for concurrent use. The three
// forms are PointsPolar, DragPolar and BestGlidePolar; DEVELOPERS.md says how
// to add another.
type Polar interface {
	Sink(v float64) float64
	// Form names the form as written in profile files: "points", "drag",
	// "best_glide".
	Form() string
}

// PolarPoint is one measured point of a polar: equivalent (indicated)
// airspeed and still-air sink rate, both in m/s, at the reference mass.
type PolarPoint struct {
	Speed, Sink float64
}

// PointsPolar is a polar fitted through three or more measured (speed, sink)
// points by least squares with a quadratic,
//
//	w₀(v) = A·v² + B·v + C
//
// which is the customary fit of a sailplane polar over its flying range (it is
// not meant for extrapolation far outside the points). The fit is solved by QR
// decomposition of the Vandermonde matrix (gonum/mat).
type PointsPolar struct {
	Points  []PolarPoint // the input points, speeds increasing
	A, B, C float64      // fit coefficients: s/m, 1, m/s
}

// NewPointsPolar fits a PointsPolar. It fails when there are fewer than three
// points, when a speed or sink is not positive and finite, when the speeds do
// not increase strictly, or when the fitted curve is not curved upward
// (A ≤ 0: the sink would not grow at high speed).
func NewPointsPolar(pts []PolarPoint) (*PointsPolar, error) {
	if len(pts) < 3 {
		return nil, fmt.Errorf("reach: points polar needs at least 3 (speed, sink) points, got %d", len(pts))
	}
	for i, p := range pts {
		if !(p.Speed > 0) || math.IsInf(p.Speed, 0) {
			return nil, fmt.Errorf("reach: points polar: point %d: speed %v m/s is not positive", i+1, p.Speed)
		}
		if !(p.Sink > 0) || math.IsInf(p.Sink, 0) {
			return nil, fmt.Errorf("reach: points polar: point %d: sink %v m/s is not positive (sink is positive downwards)", i+1, p.Sink)
		}
		if i > 0 && !(p.Speed > pts[i-1].Speed) {
			return nil, fmt.Errorf("reach: points polar: speeds must increase: point %d (%.2f m/s) is not faster than point %d (%.2f m/s)", i+1, p.Speed, i, pts[i-1].Speed)
		}
	}
	n := len(pts)
	a := mat.NewDense(n, 3, nil)
	y := mat.NewVecDense(n, nil)
	for i, p := range pts {
		a.Set(i, 0, p.Speed*p.Speed)
		a.Set(i, 1, p.Speed)
		a.Set(i, 2, 1)
		y.SetVec(i, p.Sink)
	}
	var qr mat.QR
	qr.Factorize(a)
	var x mat.VecDense
	if err := qr.SolveVecTo(&x, false, y); err != nil {
		return nil, fmt.Errorf("reach: points polar: fit failed: %w", err)
	}
	pp := &PointsPolar{Points: append([]PolarPoint(nil), pts...), A: x.AtVec(0), B: x.AtVec(1), C: x.AtVec(2)}
	if !(pp.A > 0) {
		return nil, errors.New("reach: points polar: the fitted curve does not bend upward (sink must grow faster at high speed); check the points")
	}
	return pp, nil
}

// Sink returns A·v² + B·v + C (m/s).
func (p *PointsPolar) Sink(v float64) float64 { return (p.A*v+p.B)*v + p.C }

// Form returns "points".
func (p *PointsPolar) Form() string { return "points" }

// DragPolar is the parabolic drag polar C_D = C_D0 + K·C_L², K = 1/(π·AR·e),
// of a wing of area S carrying weight W = m·g₀. In the small-angle
// approximation (L = W, w = V·C_D/C_L) the sink at sea level is
//
//	w₀(v) = a·v³ + b/v,  a = ρ₀·C_D0/(2·W/S),  b = 2·K·(W/S)/ρ₀
//
// with best glide (L/D)max = 1/(2√(C_D0·K)) at C_L = √(C_D0/K) and least sink
// at C_L = √(3·C_D0/K). The small-angle form differs from the exact one by
// about 0.03 % in speed and 0.1 % in sink at a glide ratio of 28.
//
// References: Anderson, Introduction to Flight, ch. 6 (gliding flight);
// Raymer, Aircraft Design: A Conceptual Approach, ch. 17.
type DragPolar struct {
	CD0         float64 // zero-lift drag coefficient, (0, 0.5)
	AspectRatio float64 // wing aspect ratio b²/S, (1, 60)
	Oswald      float64 // span efficiency e, (0, 1.2]
	WingArea    float64 // m²
	Mass        float64 // kg, the mass the polar is stated for (the reference mass)
}

// NewDragPolar returns a DragPolar after checking its coefficients.
func NewDragPolar(cd0, aspectRatio, oswald, wingArea, mass float64) (*DragPolar, error) {
	p := &DragPolar{CD0: cd0, AspectRatio: aspectRatio, Oswald: oswald, WingArea: wingArea, Mass: mass}
	switch {
	case !(cd0 > 0 && cd0 < 0.5):
		return nil, fmt.Errorf("reach: drag polar: cd0 %v is outside (0, 0.5)", cd0)
	case !(aspectRatio > 1 && aspectRatio < 60):
		return nil, fmt.Errorf("reach: drag polar: aspect_ratio %v is outside (1, 60)", aspectRatio)
	case !(oswald > 0 && oswald <= 1.2):
		return nil, fmt.Errorf("reach: drag polar: oswald factor %v is outside (0, 1.2]", oswald)
	case !(wingArea > 0) || math.IsInf(wingArea, 0):
		return nil, fmt.Errorf("reach: drag polar: wing_area %v m² is not positive", wingArea)
	case !(mass > 0) || math.IsInf(mass, 0):
		return nil, fmt.Errorf("reach: drag polar: mass %v kg is not positive", mass)
	}
	return p, nil
}

// K returns the induced-drag factor 1/(π·AR·e).
func (p *DragPolar) K() float64 { return 1 / (math.Pi * p.AspectRatio * p.Oswald) }

// WingLoading returns W/S = m·g₀/S in N/m².
func (p *DragPolar) WingLoading() float64 { return p.Mass * G0 / p.WingArea }

// Coefficients returns a and b of w₀(v) = a·v³ + b/v (s²/m², m²/s²).
func (p *DragPolar) Coefficients() (a, b float64) {
	ws := p.WingLoading()
	return ISADensity0 * p.CD0 / (2 * ws), 2 * p.K() * ws / ISADensity0
}

// Sink returns a·v³ + b/v (m/s).
func (p *DragPolar) Sink(v float64) float64 {
	a, b := p.Coefficients()
	return a*v*v*v + b/v
}

// SpeedAtCL returns the sea-level equivalent airspeed (m/s) at lift
// coefficient cl: v = √(2·(W/S)/(ρ₀·C_L)).
func (p *DragPolar) SpeedAtCL(cl float64) float64 {
	return math.Sqrt(2 * p.WingLoading() / (ISADensity0 * cl))
}

// StallSpeed returns the equivalent stall speed (m/s) for a maximum lift
// coefficient clmax, the speed at which C_L reaches clmax.
func (p *DragPolar) StallSpeed(clmax float64) float64 { return p.SpeedAtCL(clmax) }

// Form returns "drag".
func (p *DragPolar) Form() string { return "drag" }

// BestGlidePolar is the polar a pilot's handbook implies: the best-glide
// equivalent airspeed V_bg and the glide ratio E there, at the reference mass.
// It is the parabolic polar through that point:
//
//	w₀(v) = A·v³ + B/v,  A = 1/(2·E·V_bg²),  B = V_bg²/(2·E)
//
// so that w₀(V_bg) = V_bg/E and v/w₀ is largest at V_bg. Its least sink lies at
// 3^(−1/4)·V_bg (Anderson, Introduction to Flight, ch. 6: the parabolic
// polar in speed form).
type BestGlidePolar struct {
	Speed float64 // m/s, best-glide equivalent airspeed
	Ratio float64 // best glide ratio, (1, 100)
}

// NewBestGlidePolar returns a BestGlidePolar after checking its values.
func NewBestGlidePolar(speed, ratio float64) (*BestGlidePolar, error) {
	switch {
	case !(speed > 0) || math.IsInf(speed, 0):
		return nil, fmt.Errorf("reach: best_glide polar: best_glide_speed %v m/s is not positive", speed)
	case !(ratio > 1 && ratio < 100):
		return nil, fmt.Errorf("reach: best_glide polar: glide_ratio %v is outside (1, 100)", ratio)
	}
	return &BestGlidePolar{Speed: speed, Ratio: ratio}, nil
}

// Sink returns A·v³ + B/v (m/s).
func (p *BestGlidePolar) Sink(v float64) float64 {
	a := 1 / (2 * p.Ratio * p.Speed * p.Speed)
	b := p.Speed * p.Speed / (2 * p.Ratio)
	return a*v*v*v + b/v
}

// Form returns "best_glide".
func (p *BestGlidePolar) Form() string { return "best_glide" }
