package store

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// Temporary files are named "." + final base name + "." + random + TempSuffix
// and live in the destination directory, so the final rename never crosses a
// file system. The leading dot keeps them out of "part-*" globs.
const (
	tempPrefix = "."
	// TempSuffix ends the name of every temporary file this package creates;
	// CleanTemp removes files with this suffix (and a leading dot).
	TempSuffix = ".plumb-tmp"
)

// isTempName reports whether a directory entry name is one of our temporary
// files: "." + non-empty base + "." + non-empty random part + TempSuffix.
func isTempName(name string) bool {
	if len(name) <= len(tempPrefix)+len(TempSuffix) ||
		!strings.HasPrefix(name, tempPrefix) || !strings.HasSuffix(name, TempSuffix) {
		return false
	}
	mid := name[len(tempPrefix) : len(name)-len(TempSuffix)]
	i := strings.LastIndexByte(mid, '.')
	return i > 0 && i < len(mid)-1
}

// writeAtomic creates a temporary file next to path, lets fill write its
// content, then syncs, closes, sets perm, renames it to path and syncs the
// directory. On any error the temporary file is removed and path is left
// untouched. Errors name path.
func writeAtomic(path string, perm os.FileMode, fill func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if base == "" {
		return fmt.Errorf("store: write %q: path names a directory", path)
	}
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, tempPrefix+base+".*"+TempSuffix)
	if err != nil {
		return fmt.Errorf("store: write %s: %w", path, err)
	}
	tmp := f.Name()
	closed, renamed := false, false
	defer func() {
		if err != nil && !renamed {
			if !closed {
				_ = f.Close()
			}
			_ = os.Remove(tmp)
		}
	}()
	if err = fill(f); err != nil {
		return fmt.Errorf("store: write %s: %w", path, err)
	}
	if err = f.Chmod(perm); err != nil {
		return fmt.Errorf("store: write %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("store: write %s: sync: %w", path, err)
	}
	closed = true
	if err = f.Close(); err != nil {
		return fmt.Errorf("store: write %s: close: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("store: write %s: %w", path, err)
	}
	// From here on the new file is in place; a failing directory sync means
	// the rename may not survive a power loss, which is still worth reporting,
	// but the temporary name no longer exists and must not be removed.
	renamed = true
	if serr := syncDir(dir); serr != nil {
		return fmt.Errorf("store: write %s: sync directory: %w", path, serr)
	}
	return nil
}

// syncDir fsyncs a directory so that a rename inside it is durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	err = d.Sync()
	if cerr := d.Close(); err == nil {
		err = cerr
	}
	// Some file systems do not support syncing directories; the rename is
	// still atomic there, so do not fail the write.
	if errors.Is(err, errors.ErrUnsupported) {
		return nil
	}
	return err
}

// WriteFileAtomic writes data to path so that path holds either its old
// content or all of data, never a mix, even if the process is killed: it
// writes a temporary file in the same directory, fsyncs it, renames it over
// path and fsyncs the directory. The file gets permission bits perm.
func WriteFileAtomic(path string, data []byte, perm os.FileMode) error {
	return writeAtomic(path, perm, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// CleanTemp removes the temporary files that an interrupted WritePart or
// WriteFileAtomic left in dir (regular files named "." + name + "." + random
// + TempSuffix). It does not descend into subdirectories. Call it only when
// no write into dir is in progress, for example when a run starts or
// resumes, since it would remove that write's temporary file.
func CleanTemp(dir string) error {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return fmt.Errorf("store: clean temporary files in %s: %w", dir, err)
	}
	var errs []error
	for _, e := range entries {
		if !e.Type().IsRegular() || !isTempName(e.Name()) {
			continue
		}
		p := filepath.Join(dir, e.Name())
		if err := os.Remove(p); err != nil && !errors.Is(err, os.ErrNotExist) {
			errs = append(errs, fmt.Errorf("store: remove temporary file %s: %w", p, err))
		}
	}
	return errors.Join(errs...)
}
