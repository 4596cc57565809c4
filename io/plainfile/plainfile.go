// Package plainfile opens regular files without the runtime's network
// poller.
//
// os.Open offers every file it opens to the poller, which refuses a
// regular file: on Linux that costs four fcntl calls and a failed
// epoll_ctl beside the openat, five system calls that a batch of small
// exports pays once per file, and twice where a file is first checked
// for readability (measured with strace -c; see DEVELOPERS.md, "Speed").
package plainfile

import (
	"errors"
	"io/fs"
	"os"

	"golang.org/x/sys/unix"
)

// Open opens path for reading as os.Open does (close-on-exec, errors as
// *fs.PathError), as a blocking file that reads and closes with plain
// system calls.
func Open(path string) (*os.File, error) {
	fd, err := open(path, unix.O_RDONLY, 0)
	if err != nil {
		return nil, err
	}
	return os.NewFile(uintptr(fd), path), nil
}

// Create creates or truncates path for writing with mode perm (less the
// umask), as os.Create does with its own mode.
func Create(path string, perm os.FileMode) (*os.File, error) {
	fd, err := open(path, unix.O_WRONLY|unix.O_CREAT|unix.O_TRUNC, uint32(perm.Perm()))
	if err != nil {
		return nil, err
	}
	return os.NewFile(uintptr(fd), path), nil
}

// CanOpen reports whether path opens for reading, by opening and closing
// it (two system calls): nil, or the *fs.PathError of the open.
func CanOpen(path string) error {
	fd, err := open(path, unix.O_RDONLY, 0)
	if err != nil {
		return err
	}
	return unix.Close(fd)
}

func open(path string, mode int, perm uint32) (int, error) {
	for {
		// O_NONBLOCK is not asked for: on a regular file it changes
		// nothing, and a FIFO put in the file's place opens as os.Open
		// would open it.
		fd, err := unix.Open(path, mode|unix.O_CLOEXEC, perm)
		if errors.Is(err, unix.EINTR) {
			continue
		}
		if err != nil {
			return -1, &fs.PathError{Op: "open", Path: path, Err: err}
		}
		return fd, nil
	}
}
