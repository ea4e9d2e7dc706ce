package ingest

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
)

// WriteAtomic writes the file at path through a temporary file in the same
// folder and a rename, so that a failure (or a cancelled run) leaves no
// partial output behind and an existing file is replaced whole or not at
// all. A missing folder is created (0755 under the umask), and the file is
// created as 0644 under the umask, like any file a program writes. Errors
// name path, never the temporary file.
func WriteAtomic(path string, write func(w io.Writer) error) (err error) {
	fail := func(err error) error {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err // the temporary file's name means nothing to the user
		}
		return fmt.Errorf("cannot write %s: %w", path, err)
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return fail(err)
	}
	tmp, err := createTemp(path)
	if err != nil {
		return fail(err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err = write(tmp); err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) && pe.Path == tmp.Name() {
			return fail(err)
		}
		return err
	}
	if err = tmp.Close(); err != nil {
		return fail(err)
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fail(err)
	}
	return nil
}

// createTemp creates a new hidden file beside path, 0644 under the umask
// (os.CreateTemp would make it 0600).
func createTemp(path string) (*os.File, error) {
	dir, base := filepath.Split(path)
	for {
		name := filepath.Join(dir, "."+base+".tmp-"+strconv.FormatUint(rand.Uint64(), 36))
		f, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o644)
		if !errors.Is(err, fs.ErrExist) {
			return f, err
		}
	}
}

// WriteFileAtomic writes data to path atomically (see WriteAtomic).
func WriteFileAtomic(path string, data []byte) error {
	return WriteAtomic(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// FileSHA256 returns the hex SHA-256 of a file's content.
func FileSHA256(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// SameFile reports whether two paths name the same existing file, so that
// an output never overwrites an input.
func SameFile(a, b string) bool {
	sa, err1 := os.Stat(a)
	sb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(sa, sb)
}
