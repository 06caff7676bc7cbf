package main

import (
	"crypto/sha256"
	"encoding/json"
	"sync"

	"glidereach/cmd/glidereach/input"
	"glidereach/reach/tiling"
	"glidereach/terrain"
)

// Inputs is what every step of the pipeline needs to rebuild its inputs on
// a worker: the plan (encoded, so the steps carry plain bytes and no
// pointers), where the DEM and the zone are read from, and the work
// directory. Beam encodes the steps' exported fields as JSON when it sends
// them to the workers, so every field here is plain data. On a cluster the
// DEM files, the zone file and the work directory must be on a filesystem
// every worker mounts at the same path (README "Distributed runs").
type Inputs struct {
	// Plan is the tiling.Plan of the run, tiling.Plan.Encode.
	Plan []byte
	// Terrain are the DEM files or directories (terrain.OpenWith); none
	// means flat ground at the plan's Flat elevation.
	Terrain []string
	// CRS is the EPSG code for ESRI ASCII grids without a .prj (0: none);
	// FillVoids as terrain.OpenOptions.FillVoids.
	CRS       int
	FillVoids int
	// Zone names the zone analysed, as the flags gave it: exactly one of
	// an area file, a box text or a corridor ROUTE,WIDTH (all empty: every
	// cell of the lattice).
	Area, Box, Corridor string
	// WorkDir holds the run's work files (tiling.RunOptions.WorkDir's
	// layout: plan.gob and tiles/<tile>.gob).
	WorkDir string
}

// opened is Inputs decoded and opened once per worker process (the DoFns of
// one process share it: a DEM source keeps its open files and caches).
type opened struct {
	plan *tiling.Plan
	src  terrain.Source // nil: flat ground
	zone func(lat, lon float64) bool

	jobsOnce sync.Once
	jobs     map[int]tiling.FieldJob // by job index
	jobsErr  error
}

// fieldJobs returns the plan's field jobs by job index, computed once per
// process (tiling.Plan.FieldJobs bounds every field's glide in every loss
// model: worth doing once, not once per DoFn instance).
func (o *opened) fieldJobs() (map[int]tiling.FieldJob, error) {
	o.jobsOnce.Do(func() {
		jobs, _, err := o.plan.FieldJobs()
		if err != nil {
			o.jobsErr = err
			return
		}
		o.jobs = make(map[int]tiling.FieldJob, len(jobs))
		for _, j := range jobs {
			o.jobs[j.Index] = j
		}
	})
	return o.jobs, o.jobsErr
}

var (
	openMu    sync.Mutex
	openCache = map[string]*opened{}
)

// open decodes the plan and opens the DEM and the zone, once per process
// for the same Inputs.
func (in *Inputs) open() (*opened, error) {
	b, err := json.Marshal(in)
	if err != nil {
		return nil, err
	}
	sum := sha256.Sum256(b)
	key := string(sum[:])
	openMu.Lock()
	defer openMu.Unlock()
	if o := openCache[key]; o != nil {
		return o, nil
	}
	p, err := tiling.DecodePlan(in.Plan)
	if err != nil {
		return nil, err
	}
	o := &opened{plan: p}
	if len(in.Terrain) > 0 {
		opts := terrain.OpenOptions{FillVoids: in.FillVoids}
		if in.CRS != 0 {
			opts.CRS = terrain.CRS{EPSG: in.CRS}
		}
		if o.src, err = terrain.OpenWith(opts, in.Terrain...); err != nil {
			return nil, err
		}
	}
	z, err := openZone(in.Area, in.Box, in.Corridor)
	if err != nil {
		return nil, err
	}
	if z != nil {
		o.zone = z.Contains
	}
	openCache[key] = o
	return o, nil
}

// openZone parses the zone the flags gave (nil when none was given).
func openZone(area, box, corridor string) (input.Zone, error) {
	switch {
	case area != "":
		return input.ParseArea(area)
	case box != "":
		return input.ParseBox(box)
	case corridor != "":
		return input.ParseCorridor(corridor)
	}
	return nil, nil
}
