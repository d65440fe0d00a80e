package spicetest

import (
	"go/parser"
	"go/token"
	"io/fs"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestOnlyTestsImport walks the module and checks that no file a program
// is built from imports "testing" or this package: test tooling stays in
// packages that only tests import (DEVELOPERS.md, "What internal/ holds").
func TestOnlyTestsImport(t *testing.T) {
	root := filepath.Join("..", "..")
	fset := token.NewFileSet()
	seen := 0
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			if n := d.Name(); path != root && (strings.HasPrefix(n, ".") || n == "testdata") {
				return filepath.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(path, ".go") || strings.HasSuffix(path, "_test.go") {
			return nil
		}
		if strings.HasSuffix(filepath.Base(filepath.Dir(path)), "test") {
			return nil // the test helpers themselves (spicetest, goldentest)
		}
		f, err := parser.ParseFile(fset, path, nil, parser.ImportsOnly)
		if err != nil {
			return err
		}
		seen++
		for _, imp := range f.Imports {
			p, _ := strconv.Unquote(imp.Path.Value)
			if p == "testing" || strings.HasPrefix(p, "headroom/internal/") && strings.HasSuffix(p, "test") {
				t.Errorf("%s imports %q; only _test.go files may", path, p)
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	// The module has dozens of non-test files; a walk that saw none
	// looked in the wrong place and proved nothing.
	if seen < 20 {
		t.Fatalf("walked %d non-test files under %s; expected the whole module", seen, root)
	}
}
