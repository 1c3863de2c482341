package export

import (
	"fmt"
	"os"
	"path/filepath"
)

// writeFileAtomic writes data to path through a temporary file in the same
// directory, synced and renamed into place: the file is either the old one
// or the whole new one, never a part.
func writeFileAtomic(path string, data []byte) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("export: %w", err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			os.Remove(tmp)
		}
	}()
	if _, err = f.Write(data); err != nil {
		f.Close()
		return fmt.Errorf("export: writing %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		f.Close()
		return fmt.Errorf("export: writing %s: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("export: writing %s: %w", path, err)
	}
	if err = os.Chmod(tmp, 0o644); err != nil {
		return fmt.Errorf("export: %w", err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("export: %w", err)
	}
	return nil
}
