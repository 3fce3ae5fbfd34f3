// Package atomicfile writes output files so that a path holds either its
// previous state or the complete new content, never a partial file, and
// refuses to replace existing files unless told to.
package atomicfile

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// tempPrefix starts the names of temporary output files, which are hidden
// and end in ".tmp" so that a crashed run's leftovers are easy to spot.
const tempPrefix = ".loopgate-"

// File is an output file under construction. Data goes to a
// temporary file in the target folder; Commit flushes it to disk and
// renames it into place, so the target path holds either its previous
// state or the complete new content, never a partial file. Abort (or a
// failed Commit) removes the temporary file.
//
// Without overwrite, Commit refuses to replace an existing file (checked
// when the file is created and again, atomically where the file system
// allows hard links, when it is committed).
type File struct {
	path      string
	overwrite bool
	f         *os.File
	done      bool
}

// Create starts writing the file at path. It fails at once, before
// any work, when path exists and overwrite is false (the error wraps
// fs.ErrExist), when path is a directory, or when
// its folder is missing or cannot be written.
func Create(path string, overwrite bool) (*File, error) {
	if err := checkOutput(path, overwrite); err != nil {
		return nil, err
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, tempPrefix+base+".*.tmp")
	if err != nil {
		return nil, fmt.Errorf("output %s: cannot write in folder %s: %w", path, dir, UnwrapPath(err))
	}
	return &File{path: path, overwrite: overwrite, f: f}, nil
}

// Write writes to the temporary file.
func (a *File) Write(p []byte) (int, error) {
	if a.done {
		return 0, fmt.Errorf("output %s: write after commit or abort", a.path)
	}
	n, err := a.f.Write(p)
	if err != nil {
		err = fmt.Errorf("output %s: %w", a.path, UnwrapPath(err))
	}
	return n, err
}

// Commit syncs the temporary file to disk, makes it readable (mode 0644)
// and moves it to the target path. On any error the temporary file is
// removed and the target path is left as it was.
func (a *File) Commit() (err error) {
	if a.done {
		return fmt.Errorf("output %s: already committed or aborted", a.path)
	}
	a.done = true
	tmp := a.f.Name()
	defer func() {
		if err != nil {
			os.Remove(tmp)
		}
	}()
	if err := a.f.Sync(); err != nil {
		a.f.Close()
		return fmt.Errorf("output %s: flushing to disk: %w", a.path, UnwrapPath(err))
	}
	if err := a.f.Close(); err != nil {
		return fmt.Errorf("output %s: %w", a.path, UnwrapPath(err))
	}
	if err := os.Chmod(tmp, 0o644); err != nil {
		return fmt.Errorf("output %s: %w", a.path, UnwrapPath(err))
	}
	if a.overwrite {
		if st, err := os.Stat(a.path); err == nil && st.IsDir() {
			return fmt.Errorf("output %s: is a directory; expected a file path", a.path)
		}
		if err := os.Rename(tmp, a.path); err != nil {
			return fmt.Errorf("output %s: %w", a.path, UnwrapPath(err))
		}
	} else {
		// A hard link fails if the target exists, so no file that
		// appeared since Create is replaced.
		lerr := os.Link(tmp, a.path)
		switch {
		case lerr == nil:
			os.Remove(tmp)
		case errors.Is(lerr, fs.ErrExist):
			return existsError(a.path)
		default: // no hard links here: check, then rename
			if _, err := os.Lstat(a.path); err == nil {
				return existsError(a.path)
			}
			if err := os.Rename(tmp, a.path); err != nil {
				return fmt.Errorf("output %s: %w", a.path, UnwrapPath(err))
			}
		}
	}
	syncDir(filepath.Dir(a.path))
	return nil
}

// Abort removes the temporary file; the target path is untouched. It is a
// no-op after Commit, so `defer f.Abort()` is safe.
func (a *File) Abort() error {
	if a.done {
		return nil
	}
	a.done = true
	a.f.Close()
	if err := os.Remove(a.f.Name()); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("output %s: removing temporary file: %w", a.path, err)
	}
	return nil
}

// WriteWith writes the file at path through write, atomically (see
// File): if write or any file operation fails, no file is left at
// path (or its previous content is kept) and no temporary file remains.
func WriteWith(path string, overwrite bool, write func(w io.Writer) error) error {
	a, err := Create(path, overwrite)
	if err != nil {
		return err
	}
	defer a.Abort()
	bw := bufio.NewWriterSize(a, 1<<16)
	if err := write(bw); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	if err := bw.Flush(); err != nil {
		return err
	}
	return a.Commit()
}

// WriteFile writes data to path atomically (see WriteWith).
func WriteFile(path string, data []byte, overwrite bool) error {
	return WriteWith(path, overwrite, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// PrepareDir makes sure dir exists (creating it and its parents,
// mode 0755) and that files can be created in it, by creating and
// removing a probe file. Call it before long work so that an unwritable
// folder is reported at once.
func PrepareDir(dir string) error {
	if st, err := os.Stat(dir); err == nil && !st.IsDir() {
		return fmt.Errorf("output folder %s: is a file, not a folder", dir)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("output folder %s: cannot create it: %w", dir, UnwrapPath(err))
	}
	f, err := os.CreateTemp(dir, tempPrefix+"probe.*.tmp")
	if err != nil {
		return fmt.Errorf("output folder %s: cannot write in it: %w", dir, UnwrapPath(err))
	}
	name := f.Name()
	f.Close()
	if err := os.Remove(name); err != nil {
		return fmt.Errorf("output folder %s: cannot remove a probe file: %w", dir, UnwrapPath(err))
	}
	return nil
}

// CheckPaths reports the first of paths that exists when overwrite is
// false (the error wraps fs.ErrExist), or that is a directory. Call it before
// long work so that a run is not wasted on outputs it may not write.
func CheckPaths(paths []string, overwrite bool) error {
	for _, p := range paths {
		if err := checkOutput(p, overwrite); err != nil {
			return err
		}
	}
	return nil
}

func checkOutput(path string, overwrite bool) error {
	if path == "" || strings.HasSuffix(path, string(filepath.Separator)) {
		return fmt.Errorf("output %q: expected a file path", path)
	}
	st, err := os.Stat(path)
	switch {
	case err == nil && st.IsDir():
		return fmt.Errorf("output %s: is a directory; expected a file path", path)
	case err == nil && !overwrite:
		return existsError(path)
	case err != nil && !errors.Is(err, fs.ErrNotExist):
		return fmt.Errorf("output %s: %w", path, UnwrapPath(err))
	}
	dir := filepath.Dir(path)
	dst, err := os.Stat(dir)
	if err != nil {
		return fmt.Errorf("output %s: folder %s: %w", path, dir, UnwrapPath(err))
	}
	if !dst.IsDir() {
		return fmt.Errorf("output %s: %s is not a folder", path, dir)
	}
	return nil
}

// CleanTemps removes the temporary files that runs killed while writing
// (kill -9, power loss) left in dir, and returns how many it removed. Only
// files named like File's temporaries are touched. Do not call it
// while another run is writing into the same folder.
func CleanTemps(dir string) (int, error) {
	matches, err := filepath.Glob(filepath.Join(dir, tempPrefix+"*.tmp"))
	if err != nil {
		return 0, fmt.Errorf("output folder %s: %w", dir, err)
	}
	n := 0
	for _, m := range matches {
		if st, err := os.Lstat(m); err != nil || !st.Mode().IsRegular() {
			continue
		}
		if err := os.Remove(m); err != nil {
			return n, fmt.Errorf("output folder %s: removing %s: %w", dir, filepath.Base(m), UnwrapPath(err))
		}
		n++
	}
	return n, nil
}

func existsError(path string) error {
	return fmt.Errorf("output %s already exists and may not be replaced: %w", path, fs.ErrExist)
}

// UnwrapPath drops the *fs.PathError wrapper (whose text repeats the path
// and operation) but keeps the cause for errors.Is.
func UnwrapPath(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
}

// syncDir flushes a folder's entry list to disk so that a rename survives a
// power loss. It is best effort: some systems cannot sync folders.
func syncDir(dir string) {
	d, err := os.Open(dir)
	if err != nil {
		return
	}
	d.Sync()
	d.Close()
}
