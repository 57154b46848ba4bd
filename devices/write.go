package devices

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/gocarina/gocsv"
)

// cells returns the part's cells by column name, as the loader reads them.
func cells(p *Part) (map[string]string, error) {
	var buf bytes.Buffer
	if err := gocsv.Marshal([]Part{*p}, &buf); err != nil {
		return nil, err
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil || len(rows) != 2 {
		return nil, fmt.Errorf("encoding part %s: %v", p.Name, err)
	}
	m := make(map[string]string, len(rows[0]))
	for i, c := range rows[0] {
		m[c] = rows[1][i]
	}
	return m, nil
}

// WritePart writes a library of one part, header and row, to w.
func WritePart(w io.Writer, p *Part) error {
	c, err := cells(p)
	if err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	cols := Columns()
	row := make([]string, len(cols))
	for i, n := range cols {
		row[i] = c[n]
	}
	cw.Write(cols)
	cw.Write(row)
	cw.Flush()
	return cw.Error()
}

// AppendPart adds p to the library at path without ever overwriting a
// file or a row. A missing file is created with a header and the row
// (a temporary file linked into place, so that a file appearing meanwhile
// is not overwritten). An existing file is read, checked (it must load,
// must not hold the part's name, and its header must have every column
// the row fills), and its whole content plus the row is written to a
// temporary file in the same directory and renamed over it: atomic, and
// acceptable only because the new content is the old file unchanged with
// one row added. A file changed between the read and the rename is
// reported, not overwritten.
func AppendPart(path string, p *Part) error {
	old, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		var buf bytes.Buffer
		if err := WritePart(&buf, p); err != nil {
			return err
		}
		tmp, err := writeTemp(path, buf.Bytes())
		if err != nil {
			return err
		}
		defer os.Remove(tmp)
		if err := os.Link(tmp, path); err != nil {
			return fmt.Errorf("writing %s: %w", path, err)
		}
		return nil
	}
	if err != nil {
		return fmt.Errorf("reading %s: %w", path, err)
	}
	st, err := os.Stat(path)
	if err != nil {
		return err
	}
	lib, err := Load(path)
	if err != nil {
		return fmt.Errorf("appending to %s: %w", path, err)
	}
	for _, q := range lib.Parts {
		if strings.EqualFold(q.Name, p.Name) {
			return fmt.Errorf("%s:%d: %s: %w (choose another --name)", path, q.Line, q.Name, ErrDuplicatePart)
		}
	}
	header, err := headerOf(old)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	c, err := cells(p)
	if err != nil {
		return err
	}
	have := map[string]bool{}
	row := make([]string, len(header))
	for i, h := range header {
		n := strings.ToLower(strings.TrimSpace(h))
		have[n] = true
		row[i] = c[n]
	}
	var missing []string
	for _, n := range Columns() {
		if c[n] != "" && !have[n] {
			missing = append(missing, n)
		}
	}
	if len(missing) > 0 {
		return fmt.Errorf("%s: no column for %s: add them to the header or write to a new file", path, strings.Join(missing, ", "))
	}
	var buf bytes.Buffer
	buf.Write(old)
	if len(old) > 0 && old[len(old)-1] != '\n' {
		buf.WriteByte('\n')
	}
	cw := csv.NewWriter(&buf)
	cw.UseCRLF = bytes.Contains(old, []byte("\r\n"))
	cw.Write(row)
	cw.Flush()
	tmp, err := writeTemp(path, buf.Bytes())
	if err != nil {
		return err
	}
	if now, err := os.Stat(path); err != nil || !now.ModTime().Equal(st.ModTime()) || now.Size() != st.Size() {
		os.Remove(tmp)
		return fmt.Errorf("%s changed while the row was being added: not written", path)
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// CheckAppend reports whether AppendPart could add a part called name to
// the library at path (missing, or loading without the name), so that a
// command can fail before its work.
func CheckAppend(path, name string) error {
	if _, err := os.Stat(path); errors.Is(err, os.ErrNotExist) {
		return nil
	}
	lib, err := Load(path)
	if err != nil {
		return fmt.Errorf("appending to %s: %w", path, err)
	}
	for _, q := range lib.Parts {
		if strings.EqualFold(q.Name, name) {
			return fmt.Errorf("%s:%d: %s: %w (choose another --name)", path, q.Line, q.Name, ErrDuplicatePart)
		}
	}
	return nil
}

// headerOf returns the header record of a library's text: the first line
// that is neither blank nor a # comment (after a byte-order mark).
func headerOf(b []byte) ([]string, error) {
	b = bytes.TrimPrefix(b, []byte("\ufeff"))
	for _, l := range strings.Split(string(b), "\n") {
		t := strings.TrimSpace(l)
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		r, err := csv.NewReader(strings.NewReader(t)).Read()
		if err != nil {
			return nil, fmt.Errorf("header: %w", err)
		}
		return r, nil
	}
	return nil, errors.New("no header row")
}

// writeTemp writes b to a new temporary file beside path, synced, and
// returns its name.
func writeTemp(path string, b []byte) (string, error) {
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return "", fmt.Errorf("writing %s: %w", path, err)
	}
	_, werr := f.Write(b)
	if werr == nil {
		werr = f.Sync()
	}
	if cerr := f.Close(); werr == nil {
		werr = cerr
	}
	if werr != nil {
		os.Remove(f.Name())
		return "", fmt.Errorf("writing %s: %w", path, werr)
	}
	return f.Name(), nil
}
