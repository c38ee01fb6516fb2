package atomicfile

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"
)

// LockFile is the file in an output folder that a running hemiray holds
// locked (its content names the process).
const LockFile = ".hemiray.lock"

// ErrLocked is returned, wrapped, when another process holds the folder.
var ErrLocked = errors.New("the output folder is in use")

// Lock creates dir if needed and takes an exclusive lock on it, so that two
// runs never write a mix of their results into one folder. It fails at
// once, naming the holder, when another process has the lock; an
// unwritable folder fails here too, before any work. Leftover temporary
// files of a killed run are removed. unlock releases the lock.
func Lock(dir string) (unlock func(), err error) {
	if err := os.MkdirAll(dir, 0o777); err != nil {
		return nil, err
	}
	path := filepath.Join(dir, LockFile)
	f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o666)
	if err != nil {
		return nil, fmt.Errorf("cannot write into %s: %w", dir, err)
	}
	if err := lockFile(f); err != nil {
		holder, _ := os.ReadFile(path)
		f.Close()
		who := strings.TrimSpace(string(holder))
		if who == "" {
			who = "another process"
		}
		return nil, fmt.Errorf("%w: %s holds %s; wait for it to finish or choose another output folder", ErrLocked, who, dir)
	}
	f.Truncate(0)
	fmt.Fprintf(f, "hemiray pid %d since %s\n", os.Getpid(), time.Now().UTC().Format(time.RFC3339))
	removeStale(dir)
	return func() {
		unlockFile(f)
		f.Close()
	}, nil
}

// removeStale deletes the temporary files Write leaves when its process is
// killed mid-write; only the lock holder calls it.
func removeStale(dir string) {
	stale, _ := filepath.Glob(filepath.Join(dir, ".*.tmp"))
	for _, p := range stale {
		os.Remove(p)
	}
}
