package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// writeFileAtomic writes a file through write into a temporary file beside
// name, then renames it over name, so that name holds either its previous
// contents or the whole new file, never a part: a full disk, a failed
// render or a Ctrl-C in between leave the previous picture as it was. The
// temporary file is removed on failure.
func writeFileAtomic(name string, write func(io.Writer) error) (err error) {
	dir, base := filepath.Split(name)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err := write(tmp); err != nil {
		return err
	}
	if err := tmp.Sync(); err != nil {
		return fmt.Errorf("writing %s: %w", name, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", name, err)
	}
	// CreateTemp makes the file private (0600); a picture is an ordinary
	// file, readable as os.Create would have made it.
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), name)
}
