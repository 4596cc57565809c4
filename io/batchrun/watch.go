package batchrun

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/fsnotify/fsnotify"

	"dlsbatch/io/resultset"
)

// WatchConfig is a run that follows a folder an instrument writes into.
type WatchConfig struct {
	Run Config // the run done after each change (its Paths: the folder)
	// Settle is how long a file's size and modification time must stay
	// unchanged before it counts as complete; Poll how often the folder
	// is looked at when no file-system event says so (network shares send
	// none).
	Settle, Poll time.Duration
	// Updated is told of each published update.
	Updated func(o *Outcome, files int)
}

// Watch publishes the result set of the folder's complete files into
// cfg.Run.Out, again after every change, until ctx is done. Each update
// is a resumed run (the journal is kept), so a file is analysed once, and
// a restarted watch redoes nothing; every published set verifies.
// fsnotify wakes it at once where the file system sends events; polling
// covers the rest.
func Watch(ctx context.Context, cfg *WatchConfig) error {
	if cfg.Settle <= 0 {
		cfg.Settle = 2 * time.Second
	}
	if cfg.Poll <= 0 {
		cfg.Poll = 2 * time.Second
	}
	wake := make(chan struct{}, 1)
	if w, err := fsnotify.NewWatcher(); err == nil {
		defer w.Close()
		for _, p := range cfg.Run.Paths {
			addTree(w, p)
		}
		go func() {
			for {
				select {
				case ev, ok := <-w.Events:
					if !ok {
						return
					}
					if ev.Has(fsnotify.Create) {
						if st, err := os.Stat(ev.Name); err == nil && st.IsDir() {
							addTree(w, ev.Name)
						}
					}
					select {
					case wake <- struct{}{}:
					default:
					}
				case _, ok := <-w.Errors:
					if !ok {
						return
					}
				}
			}
		}()
	}
	type seen struct {
		size  int64
		mtime time.Time
		since time.Time
	}
	files := map[string]seen{}
	published := map[string]seen{}
	run := cfg.Run
	run.Resume, run.KeepJournal, run.Force = true, true, true
	// The output folder stays locked between publications: another run
	// into it is refused (as busy) for as long as the watch lasts.
	lock, err := resultset.TakeLock(run.Out, run.Paths)
	if err != nil {
		return fmt.Errorf("%w: %w", ErrUsage, err)
	}
	defer lock.Release()
	run.Lock = lock
	// The tables were read once for the whole watch: so they are hashed.
	if run.TableHashes, err = tableHashes(&run); err != nil {
		return err
	}
	for first := true; ; first = false {
		now := time.Now()
		stable := map[string]bool{}
		for _, root := range cfg.Run.Paths {
			filepath.WalkDir(root, func(p string, d os.DirEntry, err error) error {
				if err != nil || d.IsDir() || !strings.EqualFold(filepath.Ext(p), ".csv") || strings.HasPrefix(d.Name(), ".") {
					return nil
				}
				st, err := os.Stat(p)
				if err != nil {
					return nil
				}
				s, ok := files[p]
				if !ok || s.size != st.Size() || !s.mtime.Equal(st.ModTime()) {
					s = seen{st.Size(), st.ModTime(), now}
				}
				files[p] = s
				if now.Sub(s.since) >= cfg.Settle || first && now.Sub(st.ModTime()) >= cfg.Settle {
					stable[filepath.Clean(p)] = true
				}
				return nil
			})
		}
		changed := len(stable) != len(published)
		for p := range stable {
			if ps, ok := published[p]; !ok || ps != files[p] {
				changed = true
			}
		}
		if changed && len(stable) > 0 {
			run.Accept = func(p string) bool { return stable[filepath.Clean(p)] }
			o, err := Run(ctx, &run)
			switch {
			case errors.Is(err, ErrWriteInterrupted) || ctx.Err() != nil:
				return nil
			case err != nil:
				return fmt.Errorf("watch: %w", err)
			}
			published = map[string]seen{}
			for p := range stable {
				published[p] = files[p]
			}
			if cfg.Updated != nil {
				cfg.Updated(o, len(stable))
			}
		}
		select {
		case <-ctx.Done():
			return nil
		case <-wake:
			// let a burst of events pass, then look again after settling
			select {
			case <-ctx.Done():
				return nil
			case <-time.After(min(cfg.Poll, cfg.Settle/4+10*time.Millisecond)):
			}
		case <-time.After(cfg.Poll):
		}
	}
}

// addTree watches a folder and every folder below it.
func addTree(w *fsnotify.Watcher, root string) {
	filepath.WalkDir(root, func(p string, d os.DirEntry, err error) error {
		if err == nil && d.IsDir() {
			w.Add(p)
		}
		return nil
	})
}
