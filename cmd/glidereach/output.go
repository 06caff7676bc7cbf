package main

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"glidereach/cmd/glidereach/input"
)

// writeFileAtomic writes data to path through a temporary file in the same
// directory and a rename, so a failed run never leaves a half-written file.
func writeFileAtomic(path string, write func(f *os.File) error) (err error) {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err = write(tmp); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = os.Chmod(tmp.Name(), 0o644); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

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
func deliver(stdout io.Writer, r results) error {
	if r.out != "" {
		data, err := r.document(r.format)
		if err != nil {
			return err
		}
		if err := writeBytesAtomic(r.out, data); err != nil {
			return err
		}
	}
	if r.raster != "" {
		if err := r.writeRaster(r.raster); err != nil {
			return err
		}
	}
	if r.mapPNG != "" || r.report != "" {
		if err := r.draw(r.mapPNG, r.report); err != nil {
			return err
		}
	}
	if r.out != "" || r.format == "text" {
		r.text(stdout)
		first := true
		for _, p := range []string{r.out, r.raster, r.mapPNG, r.report} {
			if p != "" {
				if first {
					fmt.Fprintln(stdout)
					first = false
				}
				fmt.Fprintf(stdout, "wrote %s\n", p)
			}
		}
		return nil
	}
	data, err := r.document(r.format)
	if err != nil {
		return err
	}
	_, err = stdout.Write(data)
	return err
}

// checkOutputs refuses, before any computation, output paths whose
// directory does not exist, a --map that is not a .png, a --report that is
// not an .html and a --raster that is not a .tif or .asc (empty paths are
// not asked for).
func checkOutputs(out, raster, mapPNG, report string) error {
	for _, f := range []struct{ flag, path string }{{"--raster", raster}, {"--map", mapPNG}, {"--report", report}, {"--out", out}} {
		if f.path != "" {
			if err := checkOutputPath(f.flag, f.path); err != nil {
				return err
			}
		}
	}
	if mapPNG != "" && !strings.EqualFold(filepath.Ext(mapPNG), ".png") {
		return input.Usagef("--map", "%q: want a .png file name", mapPNG)
	}
	if report != "" {
		if ext := strings.ToLower(filepath.Ext(report)); ext != ".html" && ext != ".htm" {
			return input.Usagef("--report", "%q: want an .html file name", report)
		}
	}
	if raster != "" {
		ext := strings.ToLower(filepath.Ext(raster))
		if ext != ".tif" && ext != ".tiff" && ext != ".asc" {
			return input.Usagef("--raster", "%q: want a .tif or .asc file name", raster)
		}
	}
	return nil
}

// checkOutputPath refuses an output path whose directory does not exist, so
// the error comes before the computation.
func checkOutputPath(flag, path string) error {
	dir := filepath.Dir(path)
	if st, err := os.Stat(dir); err != nil || !st.IsDir() {
		return input.Usagef(flag, "%q: directory %s does not exist", path, dir)
	}
	return nil
}

// jsonDoc marshals an output document, indented by indent, with a final
// newline.
func jsonDoc(v any, indent string) ([]byte, error) {
	data, err := json.MarshalIndent(v, "", indent)
	if err != nil {
		return nil, err
	}
	return append(data, '\n'), nil
}
