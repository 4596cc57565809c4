// Package atomicfile writes files whole or not at all: the data go to a
// new temporary file beside the target, which is synced and renamed over
// the target, so a reader sees the old file or the new one, never half of
// one. Files are created with mode 0644 less the process's umask, like
// any file a program writes.
package atomicfile

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Write writes data to path atomically.
func Write(path string, data []byte) error {
	return WriteFrom(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// WriteFrom writes what fill writes to path atomically. An error from fill
// leaves path as it was.
func WriteFrom(path string, fill func(w io.Writer) error) (err error) {
	f, tmp, err := create(path)
	if err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
			err = fmt.Errorf("write %s: %w", path, err)
		}
	}()
	if err = fill(f); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	return os.Rename(tmp, path)
}

// create opens a new temporary file in path's folder, named after path so
// that a leftover (from a killed process) is recognisable.
func create(path string) (*os.File, string, error) {
	dir, base := filepath.Split(path)
	for range 100 {
		var b [6]byte
		if _, err := rand.Read(b[:]); err != nil {
			return nil, "", err
		}
		tmp := filepath.Join(dir, "."+base+".tmp-"+hex.EncodeToString(b[:]))
		f, err := os.OpenFile(tmp, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
		if errors.Is(err, os.ErrExist) {
			continue
		}
		return f, tmp, err
	}
	return nil, "", errors.New("no free temporary name")
}
