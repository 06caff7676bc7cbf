package reach

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sync"

	"glidereach/terrain"
)

// Target is a landing field for the backward solver: position in degrees,
// elevation in m MSL, and the height above it (m) the aircraft must still
// have on arrival.
type Target struct {
	Name     string
	Lat, Lon float64
	Elev     float64
	Reserve  float64
}

// RequiredOptions tune a backward reach computation.
type RequiredOptions struct {
	// Clearance is the least height above the terrain (m) the glide keeps
	// on the way. The floor at a point is terrain + min(Clearance, altitude
	// − field elevation), as in Footprint and FinalGlide: over ground
	// higher than the field the least altitude is never below the terrain
	// plus the clearance; within the clearance of the field's elevation,
	// over ground no higher than the field, it tapers to the reserve.
	Clearance float64
	// Ceiling (m MSL) bounds the altitudes computed: cells that would need
	// more are left without a value (NaN). Zero means 6000 m.
	Ceiling float64
	// Workers is the number of goroutines the fields are shared among
	// (each runs its own propagation and the results are merged); 0 means 2.
	Workers int
	// Progress, if not nil, is called now and then with the share done.
	Progress func(done float64)
}

// RequiredResult holds, for every cell of Ground, the least altitude
// (m MSL) from which some target is reached with its reserve, and which
// target that is.
type RequiredResult struct {
	Ground   *terrain.Local
	Targets  []Target
	Required []float32 // m MSL; NaN where no target is reachable below the ceiling
	Best     []int16   // index into Targets; −1 where none
	// Elevation, when not nil, gives the ground elevation at a point for
	// reports (a DEM's own bilinear value), where Ground may hold an
	// obstacle surface (the highest sample per cell) that the solver kept
	// its clearance over. Nil means Ground's own value.
	Elevation func(lat, lon float64) (float64, bool)
}

// ErrNoTargets is returned by Required when no target lies on the ground window.
var ErrNoTargets = errors.New("reach: no landing field lies on the terrain window")

// Required computes, by propagation from the targets with reversed edges
// (lowest required altitude first), the least altitude at every cell from
// which a target is reached with its reserve, the glide staying at least the
// clearance above the terrain, with the loss the aircraft meets flying
// toward the target at the altitude where it is. Paths are any-angle, as in
// Footprint. Targets off the window or on a void are skipped; ErrNoTargets
// if none is left.
func Required(ctx context.Context, ground *terrain.Local, targets []Target, model LossModel, opts RequiredOptions) (*RequiredResult, error) {
	return required(ctx, ground, targets, model, opts, nil)
}

// required is Required with a hook that may adjust each propagation before
// it runs.
func required(ctx context.Context, ground *terrain.Local, targets []Target, model LossModel, opts RequiredOptions, hook func(*propagation)) (*RequiredResult, error) {
	if ground == nil || ground.Cols < 2 || ground.Rows < 2 {
		return nil, errors.New("reach: backward reach needs a terrain window of at least 2×2 cells")
	}
	if len(targets) > math.MaxInt16 {
		return nil, fmt.Errorf("reach: too many landing fields (%d, at most %d)", len(targets), math.MaxInt16)
	}
	ceiling := opts.Ceiling
	if ceiling == 0 {
		ceiling = 6000
	}
	lo := math.Inf(1)
	for _, e := range ground.Elev {
		if e == e && float64(e) < lo {
			lo = float64(e)
		}
	}
	var srcs []source
	fieldElev := make([]float32, len(targets))
	for i, t := range targets {
		fieldElev[i] = float32(t.Elev)
		x, y := ground.Frame.Forward(t.Lat, t.Lon)
		sx, sy := (x-ground.X0)/ground.Cell, (y-ground.Y0)/ground.Cell
		if sx < 0 || sy < 0 || sx > float64(ground.Cols-1) || sy > float64(ground.Rows-1) {
			continue
		}
		if _, ok := ground.Sample(x, y); !ok {
			continue
		}
		srcs = append(srcs, source{X: sx, Y: sy, Alt: t.Elev + t.Reserve, Index: i})
		lo = math.Min(lo, t.Elev)
	}
	if len(srcs) == 0 {
		return nil, ErrNoTargets
	}
	if !(ceiling > lo) {
		return nil, fmt.Errorf("reach: ceiling %.0f m is not above the lowest field or ground (%.0f m)", ceiling, lo)
	}
	d, err := newDescentFor(model, lo-10, ceiling+10)
	if err != nil {
		return nil, err
	}
	workers := opts.Workers
	if workers <= 0 {
		workers = 2
	}
	if workers > len(srcs) {
		workers = len(srcs)
	}
	groups := make([][]source, workers)
	for i, s := range srcs {
		groups[i%workers] = append(groups[i%workers], s)
	}
	n := ground.Cols * ground.Rows
	results := make([]*propagation, workers)
	errs := make([]error, workers)
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := make([]int, workers)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			p := newPropagation(ground, d, true)
			p.clearance = float32(opts.Clearance)
			p.ceiling = ceiling
			p.fieldElev = fieldElev
			p.srcs = groups[w]
			p.initQueue(lo-20, ceiling+20, bucketWidth(ground.Cell, d))
			for k := range p.srcs {
				p.seed(k)
			}
			if hook != nil {
				hook(p)
			}
			var prog func(int)
			if opts.Progress != nil {
				prog = func(c int) {
					mu.Lock()
					done[w] = c
					t := 0
					for _, x := range done {
						t += x
					}
					mu.Unlock()
					opts.Progress(math.Min(1, float64(t)/float64(n*workers)))
				}
			}
			errs[w] = p.run(ctx, prog)
			// Keep only what the merge needs.
			p.obs, p.par, p.queue = nil, nil, nil
			results[w] = p
		}(w)
	}
	wg.Wait()
	for _, e := range errs {
		if e != nil {
			return nil, e
		}
	}
	res := &RequiredResult{Ground: ground, Targets: targets, Required: results[0].val, Best: make([]int16, n)}
	for i := range res.Best {
		res.Best[i] = -1
		if res.Required[i] == res.Required[i] {
			res.Best[i] = int16(results[0].src[i])
		}
	}
	for _, p := range results[1:] {
		for i, v := range p.val {
			if v == v && (res.Required[i] != res.Required[i] || v < res.Required[i]) {
				res.Required[i] = v
				res.Best[i] = int16(p.src[i])
			}
		}
	}
	return res, nil
}

// RequiredAt returns the least altitude (m MSL) at a point (degrees), by
// bilinear interpolation of the cells around it (the highest of them where
// one lacks a value), the field it leads to, and ok false off the window or
// where no field is reachable.
func (r *RequiredResult) RequiredAt(lat, lon float64) (alt float64, best int, ok bool) {
	g := r.Ground
	x, y := g.Frame.Forward(lat, lon)
	fx, fy := (x-g.X0)/g.Cell, (y-g.Y0)/g.Cell
	if fx < 0 || fy < 0 || fx > float64(g.Cols-1) || fy > float64(g.Rows-1) {
		return math.NaN(), -1, false
	}
	c, rr := int(fx), int(fy)
	if c >= g.Cols-1 {
		c = g.Cols - 2
	}
	if rr >= g.Rows-1 {
		rr = g.Rows - 2
	}
	tx, ty := fx-float64(c), fy-float64(rr)
	i := rr*g.Cols + c
	v := [4]float32{r.Required[i], r.Required[i+1], r.Required[i+g.Cols], r.Required[i+g.Cols+1]}
	w := [4]float64{(1 - tx) * (1 - ty), tx * (1 - ty), (1 - tx) * ty, tx * ty}
	sum, bestW := 0.0, -1.0
	best = -1
	for k := range v {
		if v[k] != v[k] {
			if w[k] > 0 {
				return math.NaN(), -1, false
			}
			continue
		}
		sum += float64(v[k]) * w[k]
		if w[k] > bestW {
			bestW = w[k]
			best = int(r.Best[[4]int{i, i + 1, i + g.Cols, i + g.Cols + 1}[k]])
		}
	}
	return sum, best, true
}

// RequiredFrom returns the least altitude (m MSL) at the point lat, lon
// (degrees) from which target is reached with its reserve, by a backward
// propagation from the target that ends as soon as the cells around the
// point are final. ok is false when the target cannot be reached from there
// below the ceiling.
func RequiredFrom(ctx context.Context, ground *terrain.Local, target Target, model LossModel, opts RequiredOptions, lat, lon float64) (alt float64, ok bool, err error) {
	g := ground
	x, y := g.Frame.Forward(lat, lon)
	fx, fy := (x-g.X0)/g.Cell, (y-g.Y0)/g.Cell
	if fx < 0 || fy < 0 || fx > float64(g.Cols-1) || fy > float64(g.Rows-1) {
		return math.NaN(), false, ErrStartOffGround
	}
	c0, r0 := min(int(fx), g.Cols-2), min(int(fy), g.Rows-2)
	need := []int{r0*g.Cols + c0, r0*g.Cols + c0 + 1, (r0+1)*g.Cols + c0, (r0+1)*g.Cols + c0 + 1}
	opts.Workers = 1
	res, err := required(ctx, ground, []Target{target}, model, opts, func(p *propagation) {
		p.stop = func(_ int) bool {
			for _, q := range need {
				if p.state[q] != cellClosed && g.Elev[q] == g.Elev[q] {
					return false
				}
			}
			return true
		}
	})
	if err != nil {
		return math.NaN(), false, err
	}
	a, _, ok := res.RequiredAt(lat, lon)
	return a, ok, nil
}

// RequiredForward returns the least start altitude (m MSL) at the point
// (lat, lon) in lo..hi from which a Footprint with opts arrives at target
// with at least its reserve (ArrivalAt ≥ Elev + Reserve), by bisection on
// forward runs until the bracket is narrower than tol metres; the upper end
// is returned, so the forward run from it reaches the field. ok is false
// when even hi does not. It costs one footprint per step and serves to
// settle the cases where the backward solver's figure and the forward one's
// verdict disagree (both searches are near-optimal, not optimal, and may
// bend their paths at different cells).
//
// lo must be above the terrain at the point; the forward solver is assumed
// monotone in the start altitude (a property test checks it).
func RequiredForward(ctx context.Context, ground *terrain.Local, lat, lon float64, target Target, model LossModel, opts FootprintOptions, lo, hi, tol float64) (alt float64, ok bool, err error) {
	if !(hi >= lo) || !(tol > 0) {
		return math.NaN(), false, fmt.Errorf("reach: RequiredForward: bad bracket %g..%g m or tolerance %g m", lo, hi, tol)
	}
	opts.Reserve = target.Reserve
	reaches := func(h float64) (bool, error) {
		f, err := Footprint(ctx, ground, Start{Lat: lat, Lon: lon, Alt: h}, model, opts)
		if err != nil {
			return false, err
		}
		a, ok := f.ArrivalAtField(target.Lat, target.Lon, target.Elev)
		return ok && a >= target.Elev+target.Reserve, nil
	}
	r, err := reaches(hi)
	if err != nil || !r {
		return math.NaN(), false, err
	}
	if r, err := reaches(lo); err != nil {
		return math.NaN(), false, err
	} else if r {
		return lo, true, nil
	}
	for hi-lo > tol {
		mid := (lo + hi) / 2
		r, err := reaches(mid)
		if err != nil {
			return math.NaN(), false, err
		}
		if r {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi, true, nil
}
