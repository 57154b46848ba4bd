package main

import (
	"bytes"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// example is one command line found in the documentation.
type example struct {
	where string   // file:line
	args  []string // after "swrank"
	code  int      // the exit status the documentation states (0 unless "# exit status N" precedes it)
}

// exitNote is a comment stating an example's exit status.
var exitNote = regexp.MustCompile(`#.*exit status (\d)`)

// docExamples returns the commands of a Markdown file: the lines inside
// code blocks (fenced or indented) that start with "swrank " or
// "go run ./cmd/swrank ", with "\" continuations joined and "&&" chains
// split.
func docExamples(t *testing.T, path string) []example {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(data), "\n")
	var out []example
	fenced, code := false, 0
	for i := 0; i < len(lines); i++ {
		l := lines[i]
		s := strings.TrimSpace(l)
		if strings.HasPrefix(s, "```") {
			fenced = !fenced
			continue
		}
		if !fenced && !strings.HasPrefix(l, "    ") && !strings.HasPrefix(l, "\t") {
			code = 0
			continue
		}
		if m := exitNote.FindStringSubmatch(s); m != nil {
			code, _ = strconv.Atoi(m[1])
			continue
		}
		if !strings.HasPrefix(s, "swrank ") && !strings.HasPrefix(s, "go run ./cmd/swrank ") {
			continue
		}
		where := path + ":" + strconv.Itoa(i+1)
		for strings.HasSuffix(s, `\`) && i+1 < len(lines) {
			i++
			s = strings.TrimSuffix(s, `\`) + " " + strings.TrimSpace(lines[i])
		}
		for _, part := range strings.Split(s, "&&") {
			words, err := splitWords(strings.TrimSpace(part))
			if err != nil {
				t.Fatalf("%s: %v", where, err)
			}
			switch {
			case len(words) > 0 && words[0] == "swrank":
				words = words[1:]
			case len(words) > 2 && words[0] == "go" && words[1] == "run":
				words = words[3:]
			default:
				t.Fatalf("%s: %q is not a swrank command", where, part)
			}
			out = append(out, example{where: where, args: words, code: code})
		}
		code = 0
	}
	return out
}

// splitWords splits a command line into words as a POSIX shell does for
// plain words and single- or double-quoted strings.
func splitWords(s string) ([]string, error) {
	var words []string
	var cur strings.Builder
	in, quote := false, rune(0)
	for _, r := range s {
		switch {
		case quote != 0 && r == quote:
			quote = 0
		case quote != 0:
			cur.WriteRune(r)
		case r == '\'' || r == '"':
			quote, in = r, true
		case r == ' ' || r == '\t':
			if in {
				words = append(words, cur.String())
				cur.Reset()
				in = false
			}
		default:
			cur.WriteRune(r)
			in = true
		}
	}
	if quote != 0 {
		return nil, strconv.ErrSyntax
	}
	if in {
		words = append(words, cur.String())
	}
	return words, nil
}

// Every command in README.md and docs/*.md runs as written on a fresh
// clone, with the exit status the documentation states (0 unless it says
// otherwise). Paths into the repository are read from there; files the
// examples write go to a temporary directory, shared by one document's
// examples in order (new, then rank --design on what it wrote).
func TestDocExamples(t *testing.T) {
	root, err := filepath.Abs("../..")
	if err != nil {
		t.Fatal(err)
	}
	docs, err := filepath.Glob(filepath.Join(root, "docs", "*.md"))
	if err != nil {
		t.Fatal(err)
	}
	docs = append([]string{filepath.Join(root, "README.md")}, docs...)
	total := 0
	for _, doc := range docs {
		exs := docExamples(t, doc)
		total += len(exs)
		if len(exs) == 0 {
			continue
		}
		t.Run(filepath.Base(doc), func(t *testing.T) {
			t.Chdir(t.TempDir())
			for _, ex := range exs {
				for _, a := range ex.args {
					if strings.Contains(a, "...") {
						t.Errorf("%s: placeholder %q: write a command that runs", ex.where, a)
					}
				}
				args := exampleArgs(root, ex)
				var out, errb bytes.Buffer
				if code := runIO(args, strings.NewReader(""), &out, &errb); code != ex.code {
					t.Errorf("%s: swrank %s: exit %d, want %d\n%s", ex.where, strings.Join(ex.args, " "), code, ex.code, errb.String())
				}
			}
		})
	}
	if total < 10 {
		t.Errorf("found %d examples in the documentation; the extraction is broken", total)
	}
}

// exampleArgs returns the arguments of ex with each path into the
// repository made absolute under root, so that it is read from the clone.
func exampleArgs(root string, ex example) []string {
	args := make([]string, len(ex.args))
	for i, a := range ex.args {
		if p := filepath.Join(root, a); !filepath.IsAbs(a) && strings.Contains(a, "/") && fileExists(p) {
			a = p
		}
		args[i] = a
	}
	return args
}

func fileExists(p string) bool {
	_, err := os.Stat(p)
	return err == nil
}
