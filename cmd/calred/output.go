package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
)

// checkOutPath looks at a file a flag names for output before any work is
// done, so that a typing mistake costs no reduction: its directory must
// exist and the name must not be a directory. A bad name is a usage error.
func checkOutPath(flagName, name string) error {
	dir := filepath.Dir(name)
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return withHint(usagef("%s %s: the directory %s does not exist", flagName, name, dir), "create it first, or give a file in an existing directory")
	case err != nil:
		return usagef("%s %s: %v", flagName, name, pathErrText(err))
	case !fi.IsDir():
		return usagef("%s %s: %s is not a directory", flagName, name, dir)
	}
	if fi, err := os.Stat(name); err == nil && fi.IsDir() {
		return usagef("%s %s: is a directory; give a file name", flagName, name)
	}
	return nil
}

// checkNotInput refuses an output file that is one of the inputs: writing
// it would destroy the data it was computed from.
func checkNotInput(flagName, name string, inputs ...string) error {
	out, err := os.Stat(name)
	if err != nil {
		return nil // not there yet: it cannot be an input
	}
	for _, in := range inputs {
		if fi, err := os.Stat(in); err == nil && os.SameFile(out, fi) {
			return usagef("%s %s: is an input of this run (%s); give another file name", flagName, name, filepath.Base(in))
		}
	}
	return nil
}

// pathErrText is an error without the path an *os.PathError repeats.
func pathErrText(err error) string {
	var pe *fs.PathError
	var le *os.LinkError
	switch {
	case errors.As(err, &pe):
		return pe.Err.Error()
	case errors.As(err, &le):
		return le.Err.Error()
	}
	return err.Error()
}

// staged is an output file written in full to a temporary file beside its
// destination; commit renames it into place, discard removes it. A run
// stages every file, appends its ledger row, and only then commits, so a
// failure leaves neither a new file nor a row behind.
type staged struct {
	flag, name, tmp string
	done            bool
}

// stage writes an output file named by flagName to a temporary file. The
// file gets the mode of the file it replaces, or 0644.
func stage(flagName, name string, write func(io.Writer) error) (*staged, error) {
	f, err := os.CreateTemp(filepath.Dir(name), "."+filepath.Base(name)+".tmp*")
	if err != nil {
		return nil, withHint(fmt.Errorf("%s %s: cannot write: %s", flagName, name, pathErrText(err)), "the directory must exist and be writable")
	}
	s := &staged{flag: flagName, name: name, tmp: f.Name()}
	mode := fs.FileMode(0o644)
	if fi, err := os.Stat(name); err == nil {
		mode = fi.Mode().Perm()
	}
	err = write(f)
	if err == nil {
		err = f.Chmod(mode)
	}
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		os.Remove(s.tmp)
		return nil, fmt.Errorf("%s %s: %s", flagName, name, pathErrText(err))
	}
	return s, nil
}

// outputs are the staged files of one command.
type outputs []*staged

// stage writes one more file; see stage.
func (o *outputs) stage(flagName, name string, write func(io.Writer) error) error {
	s, err := stage(flagName, name, write)
	if err != nil {
		return err
	}
	*o = append(*o, s)
	return nil
}

// commit renames every staged file into place.
func (o outputs) commit() error {
	for _, s := range o {
		if err := os.Rename(s.tmp, s.name); err != nil {
			return fmt.Errorf("%s %s: %s", s.flag, s.name, pathErrText(err))
		}
		s.done = true
	}
	return nil
}

// discard removes the staged files not committed; it is safe to defer.
func (o outputs) discard() {
	for _, s := range o {
		if !s.done {
			os.Remove(s.tmp)
		}
	}
}
