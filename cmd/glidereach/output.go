package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/paulmach/orb/geojson"

	"glidereach/cmd/glidereach/input"
)

// Output files follow one contract (README "Output files"):
//
//   - A regular file (or a path that does not exist yet) is written to a
//     temporary file in the same directory, synced, given the mode of the
//     file it replaces (0644 for a new one) and renamed over the target, so
//     a failed or interrupted run never leaves a half-written file.
//   - A symbolic link is followed: the file it points to is replaced the
//     same way and the link stays a link.
//   - Anything that is not a regular file (/dev/null, a FIFO, a device) is
//     opened and written straight, never replaced.
//   - A write error (ENOSPC, EIO) is a runtime failure, exit status 1.

// maxSymlinkHops bounds the links followed from an output path (Linux's own
// limit is 40).
const maxSymlinkHops = 40

// outputTarget is where the bytes of an output path end up.
type outputTarget struct {
	path   string      // the named path with symbolic links followed
	direct bool        // not a regular file: write straight to it
	exists bool        // path exists (a regular file when !direct)
	mode   os.FileMode // permission bits to keep when exists
}

// resolveOutput follows symbolic links from path and reports what is there.
// A directory is an error.
func resolveOutput(path string) (outputTarget, error) {
	p := path
	for hop := 0; ; hop++ {
		st, err := os.Lstat(p)
		if errors.Is(err, os.ErrNotExist) {
			return outputTarget{path: p}, nil
		}
		if err != nil {
			return outputTarget{}, err
		}
		switch m := st.Mode(); {
		case m&os.ModeSymlink != 0:
			if hop >= maxSymlinkHops {
				return outputTarget{}, fmt.Errorf("more than %d symbolic links", maxSymlinkHops)
			}
			link, err := os.Readlink(p)
			if err != nil {
				return outputTarget{}, err
			}
			if !filepath.IsAbs(link) {
				link = filepath.Join(filepath.Dir(p), link)
			}
			p = link
		case m.IsDir():
			return outputTarget{}, fmt.Errorf("%s is a directory", p)
		case m.IsRegular():
			return outputTarget{path: p, exists: true, mode: m.Perm()}, nil
		default:
			return outputTarget{path: p, direct: true, exists: true}, nil
		}
	}
}

// stagedFile is an output written but not yet in place: a temporary file
// beside its target, or nothing left to do for a direct target.
type stagedFile struct {
	target outputTarget
	tmp    string // "" for a direct target
}

// stageFile writes an output for path: to a synced temporary file beside
// the (link-followed) target, or straight to a target that is not a regular
// file. The temporary file keeps the target's extension, so writers that
// choose a format by extension can be given its name. On error nothing is
// left behind.
func stageFile(path string, write func(f *os.File) error) (*stagedFile, error) {
	t, err := resolveOutput(path)
	if err != nil {
		return nil, writeErr(path, err)
	}
	if t.direct {
		f, err := os.OpenFile(t.path, os.O_WRONLY, 0)
		if err != nil {
			return nil, writeErr(path, err)
		}
		err = write(f)
		if cerr := f.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			return nil, writeErr(path, err)
		}
		return &stagedFile{target: t}, nil
	}
	tmp, err := createTempBeside(t.path)
	if err != nil {
		return nil, writeErr(path, err)
	}
	s := &stagedFile{target: t, tmp: tmp.Name()}
	err = write(tmp)
	if err == nil {
		err = tmp.Sync()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	mode := os.FileMode(0o644)
	if t.exists {
		mode = t.mode
	}
	if err == nil {
		err = os.Chmod(s.tmp, mode)
	}
	if err != nil {
		s.discard()
		return nil, writeErr(path, err)
	}
	return s, nil
}

// createTempBeside creates an empty temporary file in target's directory,
// named after it and with its extension.
func createTempBeside(target string) (*os.File, error) {
	base := strings.ReplaceAll(filepath.Base(target), "*", "_")
	ext := filepath.Ext(base)
	return os.CreateTemp(filepath.Dir(target), "."+strings.TrimSuffix(base, ext)+".tmp-*"+ext)
}

// commit renames the temporary file over the target and syncs the
// directory; a direct target has nothing to do.
func (s *stagedFile) commit() error {
	if s.tmp == "" {
		return nil
	}
	if err := os.Rename(s.tmp, s.target.path); err != nil {
		s.discard()
		return writeErr(s.target.path, err)
	}
	s.tmp = ""
	if d, err := os.Open(filepath.Dir(s.target.path)); err == nil {
		d.Sync() // best effort: the rename is durable once the directory is
		d.Close()
	}
	return nil
}

// discard removes the temporary file, if any.
func (s *stagedFile) discard() {
	if s.tmp != "" {
		os.Remove(s.tmp)
		s.tmp = ""
	}
}

// writeFileAtomic writes one output file by the contract above: staged,
// then renamed into place.
func writeFileAtomic(path string, write func(f *os.File) error) error {
	s, err := stageFile(path, write)
	if err != nil {
		return err
	}
	return s.commit()
}

// writeBytesAtomic writes data to path by the same contract.
func writeBytesAtomic(path string, data []byte) error {
	return writeFileAtomic(path, func(f *os.File) error { _, err := f.Write(data); return err })
}

// outputSet stages several outputs of one run so that none replaces its
// target until every one is written: writers are given a reserved
// temporary name beside each target (with the target's extension), and
// commit renames them all in a fixed order. discard, deferred by the
// caller, removes every temporary file still there on any exit path.
type outputSet struct {
	staged []*stagedFile
}

// reserve returns the name a writer should write path's output to: a fresh
// empty temporary file beside a regular target, or path itself for a
// target that is not a regular file (written straight).
func (o *outputSet) reserve(path string) (string, error) {
	t, err := resolveOutput(path)
	if err != nil {
		return "", writeErr(path, err)
	}
	s := &stagedFile{target: t}
	o.staged = append(o.staged, s)
	if t.direct {
		return t.path, nil
	}
	f, err := createTempBeside(t.path)
	if err != nil {
		return "", writeErr(path, err)
	}
	s.tmp = f.Name()
	f.Close()
	return s.tmp, nil
}

// commit gives every staged file the mode of its target and renames it
// into place in the order reserved; it stops at the first failure (the
// rest are discarded by discard).
func (o *outputSet) commit() error {
	for _, s := range o.staged {
		if s.tmp == "" {
			continue
		}
		mode := os.FileMode(0o644)
		if s.target.exists {
			mode = s.target.mode
		}
		if err := os.Chmod(s.tmp, mode); err != nil {
			return writeErr(s.target.path, err)
		}
		if err := s.commit(); err != nil {
			return err
		}
	}
	return nil
}

// adopt adds a file already written under the temporary name tmp, to be
// renamed to path with the others (an ASCII grid's sidecars).
func (o *outputSet) adopt(tmp, path string) error {
	t, err := resolveOutput(path)
	if err != nil {
		os.Remove(tmp)
		return writeErr(path, err)
	}
	o.staged = append(o.staged, &stagedFile{target: t, tmp: tmp})
	return nil
}

// discard removes the temporary files not renamed.
func (o *outputSet) discard() {
	for _, s := range o.staged {
		s.discard()
	}
}

// errWriter passes writes to w and keeps the first error, so that text
// written with fmt.Fprintf can still report a failed write (a full disk,
// a closed pipe).
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return 0, e.err
	}
	n, err := e.w.Write(p)
	if err != nil {
		e.err = err
	}
	return n, err
}

// writeFailure marks a failed write of output, so that main reports it
// with exit status 1 whatever its text says.
type writeFailure struct{ err error }

func (w *writeFailure) Error() string { return "writing " + w.err.Error() }

// writeErr is the error of a failed write to path.
func writeErr(path string, err error) error {
	return &writeFailure{fmt.Errorf("%s: %w", path, err)}
}
func (w *writeFailure) Unwrap() error { return w.err }

// results is what one command run delivers, in the order of the
// command-line contract: files first (so a failure leaves nothing
// half-written and prints no summary), then stdout.
type results struct {
	out, format    string // --out and --format
	raster         string // --raster, "" when the command has none
	mapPNG, report string
	// document renders the --out file (and stdout for non-text formats).
	document func(format string) ([]byte, error)
	// writeRaster, draw and text write the raster, the map and report,
	// and the human summary.
	writeRaster func(path string) error
	draw        func(mapPath, reportPath string) error
	text        func(w io.Writer)
}

// deliver writes the files a run asked for and then stdout: the text
// summary when --format is text or --out was given (followed by the files
// written), else the document in the chosen format.
//
// Every file is first written in full to a temporary file beside its
// target; only when all are written are they renamed into place, in the
// order --out, --raster, --map, --report (README "Output files"). A
// cancelled ctx (SIGINT, SIGTERM) before the renames leaves every existing
// file untouched and no temporary file behind.
func deliver(ctx context.Context, stdout io.Writer, r results) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	var set outputSet
	defer set.discard()
	tmp := map[string]string{}
	for _, p := range []string{r.out, r.raster, r.mapPNG, r.report} {
		if p != "" {
			t, err := set.reserve(p)
			if err != nil {
				return err
			}
			tmp[p] = t
		}
	}
	if r.out != "" {
		data, err := r.document(r.format)
		if err != nil {
			return err
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		if err := writeBytesAtomic(tmp[r.out], data); err != nil {
			return err
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if r.raster != "" {
		if err := r.writeRaster(tmp[r.raster]); err != nil {
			return err
		}
		// An ASCII grid's sidecars (writeRaster) were written beside its
		// temporary name; they are renamed with it.
		if t := tmp[r.raster]; t != r.raster && strings.EqualFold(filepath.Ext(r.raster), ".asc") {
			tp, ta := ascSidecarNames(t)
			p, a := ascSidecarNames(r.raster)
			if err := set.adopt(tp, p); err != nil {
				return err
			}
			if err := set.adopt(ta, a); err != nil {
				return err
			}
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if r.mapPNG != "" || r.report != "" {
		if err := r.draw(tmp[r.mapPNG], tmp[r.report]); err != nil {
			return err
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if err := set.commit(); err != nil {
		return err
	}
	ew := &errWriter{w: stdout}
	if r.out != "" || r.format == "text" {
		r.text(ew)
		first := true
		for _, p := range []string{r.out, r.raster, r.mapPNG, r.report} {
			if p != "" {
				if first {
					fmt.Fprintln(ew)
					first = false
				}
				fmt.Fprintf(ew, "wrote %s\n", p)
			}
		}
	} else {
		data, err := r.document(r.format)
		if err != nil {
			return err
		}
		ew.Write(data)
	}
	if ew.err != nil {
		return &writeFailure{fmt.Errorf("standard output: %w", ew.err)}
	}
	return nil
}

// checkOutputs refuses, before any computation, output paths that cannot
// be written (see checkOutputPath), two outputs naming the same file, a
// --map that is not a .png, a --report that is not an .html and a
// --raster that is not a .tif or .asc (empty paths are not asked for).
func checkOutputs(out, raster, mapPNG, report string) error {
	type named struct{ flag, path string }
	seenTarget := map[string]string{}
	for _, f := range []named{{"--raster", raster}, {"--map", mapPNG}, {"--report", report}, {"--out", out}} {
		if f.path == "" {
			continue
		}
		if err := checkOutputPath(f.flag, f.path); err != nil {
			return err
		}
		key := sameFileKey(f.path)
		if prev, ok := seenTarget[key]; ok && key != "" {
			return input.Usagef(f.flag, "%q is the same file as %s; give each output its own file", f.path, prev)
		}
		seenTarget[key] = f.flag
	}
	// A device or FIFO (/dev/null) takes any output whatever its name.
	direct := func(p string) bool { t, err := resolveOutput(p); return err == nil && t.direct }
	if mapPNG != "" && !direct(mapPNG) && !strings.EqualFold(filepath.Ext(mapPNG), ".png") {
		return input.Usagef("--map", "%q: want a .png file name", mapPNG)
	}
	if report != "" && !direct(report) {
		if ext := strings.ToLower(filepath.Ext(report)); ext != ".html" && ext != ".htm" {
			return input.Usagef("--report", "%q: want an .html file name", report)
		}
	}
	if raster != "" && !direct(raster) {
		ext := strings.ToLower(filepath.Ext(raster))
		if ext != ".tif" && ext != ".tiff" && ext != ".asc" {
			return input.Usagef("--raster", "%q: want a .tif or .asc file name", raster)
		}
	}
	return nil
}

// sameFileKey names the file an output path ends up in, so that two paths
// for one file (a link, "./x" and "x") compare equal. Devices such as
// /dev/null may be named by several outputs at once.
func sameFileKey(path string) string {
	t, err := resolveOutput(path)
	if err != nil {
		return path
	}
	if t.direct {
		return "" // a device or FIFO may be named by several outputs
	}
	dir, err := filepath.EvalSymlinks(filepath.Dir(t.path))
	if err != nil {
		dir = filepath.Dir(t.path)
	}
	if abs, err := filepath.Abs(dir); err == nil {
		dir = abs
	}
	return filepath.Join(dir, filepath.Base(t.path))
}

// checkOutputPath refuses, so that the error comes before the computation,
// an output path that is a directory, whose directory does not exist, or
// (for a regular file, replaced through a temporary file beside it) whose
// directory is not writable.
func checkOutputPath(flag, path string) error {
	t, err := resolveOutput(path)
	if err != nil {
		return input.Usagef(flag, "%q: %v", path, err)
	}
	if t.direct {
		return nil
	}
	dir := filepath.Dir(t.path)
	if st, err := os.Stat(dir); err != nil || !st.IsDir() {
		return input.Usagef(flag, "%q: directory %s does not exist", path, dir)
	}
	// Create (and remove) a file there: the temporary file of the output
	// will need the same, and this also catches a read-only file system.
	probe, err := os.CreateTemp(dir, ".glidereach-check-*")
	if err != nil {
		return input.Usagef(flag, "%q: cannot create files in %s (%v)", path, dir, err)
	}
	probe.Close()
	os.Remove(probe.Name())
	return nil
}

// jsonDoc marshals an output document, indented by indent, with a final
// newline. A GeoJSON FeatureCollection is first made valid under RFC 7946
// §3.1.9 (splitAntimeridian).
func jsonDoc(v any, indent string) ([]byte, error) {
	if fc, ok := v.(*geojson.FeatureCollection); ok {
		splitAntimeridian(fc)
	}
	data, err := json.MarshalIndent(v, "", indent)
	if err != nil {
		return nil, err
	}
	return append(data, '\n'), nil
}

// Conservative rounding. A required altitude is rounded up and an arrival
// height or a margin down, so that a rounded figure never promises more
// than the computation: 1084.01 m needed prints as 1085 m (text) or
// 1084.1 m (JSON), an arrival of 449.99 m as 449 m or 449.9 m. The 1e-6
// guard keeps a value that is whole up to floating-point noise whole.
// NaN and infinities become "-" (text) or JSON null.

// numUp rounds v up to 0.1 for JSON.
func numUp(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return math.Ceil(v*10-1e-6) / 10
}

// numDown rounds v down to 0.1 for JSON.
func numDown(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return math.Floor(v*10+1e-6) / 10
}

// fmtMUp prints v rounded up to a whole metre.
func fmtMUp(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return fmt.Sprintf("%.0f", math.Ceil(v-1e-6))
}

// fmtMDown prints v rounded down to a whole metre.
func fmtMDown(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return fmt.Sprintf("%.0f", math.Floor(v+1e-6))
}

// fractionDown rounds a covered share (0..1) down to 1e-4 for JSON, and
// pctDown gives it in per cent rounded down to 0.1 for text ("%.1f"): a
// share of the route or area with a field in reach must not read larger
// than it is.
func fractionDown(f float64) float64 { return math.Floor(f*1e4+1e-9) / 1e4 }

func pctDown(f float64) float64 { return math.Floor(f*1e3+1e-9) / 10 }
