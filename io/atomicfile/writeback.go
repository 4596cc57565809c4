package atomicfile

import (
	"os"

	"golang.org/x/sys/unix"

	"dlsbatch/io/plainfile"
)

// StartWriteback asks the kernel to begin writing the n bytes of f from
// off to disk (n = 0: to the end) without waiting for it
// (sync_file_range(2) with SYNC_FILE_RANGE_WRITE). It makes nothing
// durable: a result set is still flushed whole before it is swapped in
// (io/resultset), but that flush then finds most pages written or on their
// way, instead of starting on all of them at the end of the run. It is a
// hint: an error (a file system without it) is ignored.
func StartWriteback(f *os.File, off, n int64) {
	_ = unix.SyncFileRange(int(f.Fd()), off, n, unix.SYNC_FILE_RANGE_WRITE)
}

// WriteStaged writes data to path (created with mode 0644 less the umask,
// or truncated) in a staging folder that is flushed whole before it is
// used, and starts its writeback. Not atomic: for files that no reader
// sees before the folder is swapped in.
// Its errors are the *fs.PathError of the open, write or close, which
// name the path.
func WriteStaged(path string, data []byte) error {
	f, err := plainfile.Create(path, 0o644)
	if err != nil {
		return err
	}
	if _, err := f.Write(data); err != nil {
		f.Close()
		return err
	}
	StartWriteback(f, 0, 0)
	return f.Close()
}
