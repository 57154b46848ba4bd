package rank_test

import (
	"bufio"
	"go/parser"
	"go/token"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The packages import one way, in the order docs/architecture.md gives:
// each package's own (non-test) files import only packages listed above
// it, and every package of the module is listed.
func TestImportsFollowArchitecture(t *testing.T) {
	const module = "swrank"
	root := filepath.Join("..")
	order := architectureOrder(t, filepath.Join(root, "docs", "architecture.md"))
	imports := moduleImports(t, root, module)
	for pkg, deps := range imports {
		at, ok := order[pkg]
		if !ok {
			t.Errorf("package %s is not listed in docs/architecture.md", pkg)
			continue
		}
		for _, dep := range deps {
			if d, ok := order[dep]; !ok || d >= at {
				t.Errorf("%s (order %d) imports %s (order %d): imports must run to packages listed above", pkg, at, dep, d)
			}
		}
	}
	for pkg := range order {
		if _, ok := imports[pkg]; !ok {
			t.Errorf("docs/architecture.md lists %s, which has no Go files", pkg)
		}
	}
}

// architectureOrder reads the table of docs/architecture.md: package path
// (relative to the module) to its order.
func architectureOrder(t *testing.T, path string) map[string]int {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	row := regexp.MustCompile("^\\| (\\d+) \\| `([^`]+)` \\|")
	order := map[string]int{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if m := row.FindStringSubmatch(sc.Text()); m != nil {
			n, _ := strconv.Atoi(m[1])
			order[m[2]] = n
		}
	}
	if len(order) == 0 {
		t.Fatalf("%s: no package table found", path)
	}
	return order
}

// moduleImports maps each package directory of the module (relative path)
// to the module packages its non-test files import.
func moduleImports(t *testing.T, root, module string) map[string][]string {
	t.Helper()
	out := map[string][]string{}
	fset := token.NewFileSet()
	err := filepath.WalkDir(root, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && (strings.HasPrefix(d.Name(), ".") && p != root || d.Name() == "testdata") {
			return filepath.SkipDir
		}
		if d.IsDir() || !strings.HasSuffix(p, ".go") || strings.HasSuffix(p, "_test.go") {
			return nil
		}
		rel, err := filepath.Rel(root, filepath.Dir(p))
		if err != nil {
			return err
		}
		rel = filepath.ToSlash(rel)
		f, err := parser.ParseFile(fset, p, nil, parser.ImportsOnly)
		if err != nil {
			return err
		}
		deps := out[rel]
		for _, im := range f.Imports {
			path, _ := strconv.Unquote(im.Path.Value)
			if path == module || strings.HasPrefix(path, module+"/") {
				deps = append(deps, strings.TrimPrefix(strings.TrimPrefix(path, module), "/"))
			}
		}
		out[rel] = deps
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}
