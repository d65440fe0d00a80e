package limited

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

func TestReadFile(t *testing.T) {
	dir := t.TempDir()
	small := filepath.Join(dir, "small.txt")
	if err := os.WriteFile(small, []byte("12345"), 0o644); err != nil {
		t.Fatal(err)
	}
	fifo := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("no FIFO here: %v", err)
	}
	data, err := ReadFile(small, 5, "a note")
	if err != nil || string(data) != "12345" {
		t.Fatalf("a file at the limit: %q, %v", data, err)
	}
	cases := []struct{ path, want string }{
		{small + "x", "small.txtx: no such file or directory"},
		{dir, ": is a directory, expected a note"},
		{fifo, "pipe: not a regular file (p---------), expected a note"},
	}
	for _, c := range cases {
		if _, err := ReadFile(c.path, 5, "a note"); err == nil || !strings.HasSuffix(err.Error(), c.want) {
			t.Errorf("ReadFile(%s): %v, want it to end %q", c.path, err, c.want)
		}
	}
	if _, err := ReadFile(small, 4, "a note"); err == nil || err.Error() != small+": 5 bytes, larger than the 4-byte limit for a note" {
		t.Errorf("one byte over: %v", err)
	}
	if _, err := ReadFile(small+"x", 5, "a note"); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("missing file: %v does not unwrap to fs.ErrNotExist", err)
	}
	if _, err := ReadAll(strings.NewReader("123456"), "in", 5, "a note"); err == nil || err.Error() != "in: larger than the 5-byte limit for a note" {
		t.Errorf("ReadAll over the limit: %v", err)
	}
}
