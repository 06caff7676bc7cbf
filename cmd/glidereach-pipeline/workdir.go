package main

import (
	"io"
	"os"
	"path/filepath"

	"glidereach/reach/tiling"
)

// saveTile writes a finished tile to dir/tiles/<tile>.gob through a
// temporary file and a rename (tiling.Run's layout), so a failed or retried
// step leaves the whole file or none.
func saveTile(dir string, tr *tiling.TileResult) error {
	data, err := tr.Encode()
	if err != nil {
		return err
	}
	return writeAtomic(filepath.Join(dir, "tiles", tr.Tile.String()+".gob"), data)
}

// writeAtomic writes data to path through a temporary file in the same
// directory and a rename.
func writeAtomic(path string, data []byte) error {
	return writeFileAtomic(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// writeFileAtomic writes path with write through a temporary file in the
// same directory and a rename: a failed write leaves no file behind, and a
// file already there stays as it was. The new file gets the mode of the
// file it replaces, 0644 when there was none (as glidereach's outputs).
func writeFileAtomic(path string, write func(io.Writer) error) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	f, err := os.CreateTemp(filepath.Dir(path), ".tmp-*")
	if err != nil {
		return err
	}
	if err := write(f); err != nil {
		f.Close()
		os.Remove(f.Name())
		return err
	}
	if err := f.Close(); err != nil {
		os.Remove(f.Name())
		return err
	}
	mode := os.FileMode(0o644)
	if fi, err := os.Stat(path); err == nil {
		mode = fi.Mode().Perm()
	}
	if err := os.Chmod(f.Name(), mode); err != nil {
		os.Remove(f.Name())
		return err
	}
	if err := os.Rename(f.Name(), path); err != nil {
		os.Remove(f.Name())
		return err
	}
	return nil
}
