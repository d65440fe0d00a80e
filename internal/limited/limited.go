// Package limited reads the files users hand to headroom (scenarios, cell
// files, discharge logs) whole, with a size limit, refusing what would
// block or exhaust memory: folders, FIFOs and devices, and files over the
// limit. Every reader of a user file goes through it, so the rule and its
// messages are written once.
package limited

import (
	"errors"
	"fmt"
	"io"
	"os"
)

// ReadFile reads the file at path, at most limit bytes. what says what the
// file should have been, for messages: "a scenario file (.toml)". Errors
// name the path: "big.toml: 10000000 bytes, larger than the 1048576-byte
// limit for a scenario file (.toml)".
func ReadFile(path string, limit int64, what string) ([]byte, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, UnwrapPath(err))
	}
	if st.IsDir() {
		return nil, fmt.Errorf("%s: is a directory, expected %s", path, what)
	}
	if !st.Mode().IsRegular() {
		// A FIFO or a device would block the open or the read forever.
		return nil, fmt.Errorf("%s: not a regular file (%s), expected %s", path, st.Mode().Type(), what)
	}
	if st.Size() > limit {
		return nil, fmt.Errorf("%s: %d bytes, larger than the %d-byte limit for %s", path, st.Size(), limit, what)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, UnwrapPath(err))
	}
	defer f.Close()
	// The file may have grown since Stat: read through the same limit.
	return ReadAll(f, path, limit, what)
}

// ReadAll reads r whole, at most limit bytes; name is the place for
// messages.
func ReadAll(r io.Reader, name string, limit int64, what string) ([]byte, error) {
	data, err := io.ReadAll(io.LimitReader(r, limit+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, UnwrapPath(err))
	}
	if int64(len(data)) > limit {
		return nil, fmt.Errorf("%s: larger than the %d-byte limit for %s", name, limit, what)
	}
	return data, nil
}

// UnwrapPath returns the reason inside an *os.PathError (the path is
// named in the message already), or err itself.
func UnwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
