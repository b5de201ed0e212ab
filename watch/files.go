package watch

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"syscall"

	"golang.org/x/sys/unix"
)

// errNotRegular is a path that is not (a symlink to) a regular file.
var errNotRegular = errors.New("not a regular file")

// fingerprint returns the SHA-256 of the file's content, hex. The file is
// opened without blocking (a FIFO put in its place must not hang the
// watcher) and only when it is a regular file.
func fingerprint(path string) (string, error) {
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return "", err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return "", err
	}
	if !st.Mode().IsRegular() {
		return "", fmt.Errorf("%s: %w", path, errNotRegular)
	}
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", fmt.Errorf("%s: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// writeAtomic writes data to path through a temporary file in the same
// folder that is synced and then renamed over path, so a reader (or a
// restart after a crash) finds either the old file or the whole new one.
func writeAtomic(path string, data []byte) error {
	dir := filepath.Dir(path)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	// One fixed temporary name per file: a write cut short by a crash is
	// overwritten and renamed away by the write that redoes it.
	name := filepath.Join(dir, "."+filepath.Base(path)+".kweigh-tmp")
	tmp, err := os.OpenFile(name, os.O_CREATE|os.O_TRUNC|os.O_WRONLY, 0o644)
	if err != nil {
		return err
	}
	_, err = tmp.Write(data)
	if err == nil {
		err = tmp.Sync()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(name, path)
	}
	if err != nil {
		os.Remove(name)
		return fmt.Errorf("%s: %w", path, err)
	}
	return syncDir(dir)
}

// syncDir makes a rename or removal in dir durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	err = d.Sync()
	if cerr := d.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("%s: %w", dir, err)
	}
	return nil
}

// errClash is a destination that already holds a different file.
var errClash = errors.New("destination exists")

// moveFile moves src to dst, never overwriting: one rename(2) with
// RENAME_NOREPLACE on the same file system; across file systems a copy to a
// hidden temporary name beside dst, fsync, a size check, a no-replace rename
// into place and only then the removal of src. It is safe to repeat after a
// crash at any point: a dst that exists with the expected size is the
// finished copy, and only src remains to be removed.
func moveFile(src, dst string, size int64) error {
	if err := os.MkdirAll(filepath.Dir(dst), 0o755); err != nil {
		return err
	}
	if st, err := os.Stat(dst); err == nil {
		if st.Mode().IsRegular() && st.Size() == size {
			return removeSource(src)
		}
		return fmt.Errorf("%s: %w", dst, errClash)
	}
	err := renameNoReplace(src, dst)
	switch {
	case err == nil:
		return syncDir(filepath.Dir(dst))
	case errors.Is(err, unix.EEXIST):
		return fmt.Errorf("%s: %w", dst, errClash)
	case !errors.Is(err, unix.EXDEV):
		return err
	}
	if err := copyFile(src, dst, size); err != nil {
		return err
	}
	testPause("copied", src)
	return removeSource(src)
}

func removeSource(src string) error {
	if err := os.Remove(src); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return err
	}
	return syncDir(filepath.Dir(src))
}

// renameNoReplace renames without replacing an existing dst; where the
// kernel or file system lacks RENAME_NOREPLACE it falls back to link+unlink,
// which also fails on an existing dst.
func renameNoReplace(src, dst string) error {
	err := unix.Renameat2(unix.AT_FDCWD, src, unix.AT_FDCWD, dst, unix.RENAME_NOREPLACE)
	if errors.Is(err, unix.EINVAL) || errors.Is(err, unix.ENOSYS) {
		if err = os.Link(src, dst); err == nil {
			return os.Remove(src)
		}
	}
	if err != nil {
		return &os.LinkError{Op: "rename", Old: src, New: dst, Err: err}
	}
	return nil
}

// copyFile copies src to dst through a temporary name in dst's folder.
func copyFile(src, dst string, size int64) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	tmp := filepath.Join(filepath.Dir(dst), "."+filepath.Base(dst)+".kweigh-copy")
	os.Remove(tmp) // left by a copy that was cut short
	out, err := os.OpenFile(tmp, os.O_CREATE|os.O_EXCL|os.O_WRONLY, 0o644)
	if err != nil {
		return err
	}
	n, err := io.Copy(out, in)
	if err == nil {
		err = out.Sync()
	}
	if cerr := out.Close(); err == nil {
		err = cerr
	}
	if err == nil && n != size {
		err = fmt.Errorf("copied %d bytes of %s, expected %d", n, src, size)
	}
	if err == nil {
		if st, serr := os.Stat(tmp); serr != nil || st.Size() != size {
			err = fmt.Errorf("%s: copy has the wrong size", tmp)
		}
	}
	if err == nil {
		err = renameNoReplace(tmp, dst)
		if errors.Is(err, unix.EEXIST) {
			err = fmt.Errorf("%s: %w", dst, errClash)
		}
	}
	if err != nil {
		os.Remove(tmp)
		return err
	}
	return syncDir(filepath.Dir(dst))
}
