package spice

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"
)

// Runner runs ngspice decks in batch mode, one bounded process per deck.
type Runner struct {
	// Bin is the path of the ngspice executable. Required.
	Bin string
	// Timeout bounds one ngspice run (wall clock). Default 60 s.
	Timeout time.Duration
	// Keep leaves every run's scratch directory (deck, model files, output)
	// in place. Default false: removed after the run.
	Keep bool
	// KeepFailed leaves the scratch directory of a failed run in place and
	// names it in the error. Default false.
	KeepFailed bool
}

// ErrNoNgspice is returned by FindNgspice when no executable is found.
var ErrNoNgspice = errors.New("ngspice not found in PATH")

// InstallHint is the install step named when ngspice is missing.
const InstallHint = "install it (apt-get install ngspice on Debian) or give its path with --ngspice"

// FindNgspice returns a Runner for the ngspice found in PATH.
func FindNgspice(timeout time.Duration) (*Runner, error) {
	p, err := exec.LookPath("ngspice")
	if err != nil {
		return nil, ErrNoNgspice
	}
	return &Runner{Bin: p, Timeout: timeout}, nil
}

// NewRunner returns a Runner for the ngspice at path, or for the one in
// PATH when path is empty. A missing executable is an error naming the
// install step (InstallHint) and wrapping ErrNoNgspice.
func NewRunner(path string, timeout time.Duration) (*Runner, error) {
	if path == "" {
		r, err := FindNgspice(timeout)
		if err != nil {
			return nil, fmt.Errorf("%w: %s", err, InstallHint)
		}
		return r, nil
	}
	p, err := exec.LookPath(path)
	if err != nil {
		return nil, fmt.Errorf("%w: %s: %v; %s", ErrNoNgspice, path, errors.Unwrap(err), InstallHint)
	}
	return &Runner{Bin: p, Timeout: timeout}, nil
}

// Job is one ngspice run: the deck, the files it includes, and the wrdata
// files to read back.
type Job struct {
	Name    string            // for messages, e.g. "verify slate-30-lo"
	Deck    string            // the netlist, written as deck.cir; its control block ends with "quit 0"
	Files   map[string][]byte // further files written beside the deck (relative names), e.g. included models
	Outputs []string          // wrdata files the deck writes (relative names)
	// Compat is ngspice's compatibility mode (the ngbehavior variable,
	// e.g. "ps" or "ltpsa"), written to a .spiceinit in the scratch
	// directory; "" runs without any start-up file.
	Compat string
}

// Table is one file written by ngspice's wrdata with wr_singlescale and
// wr_vecnames set: named columns of equal length, the scale first.
type Table struct {
	Names []string    // column names as ngspice writes them, e.g. "time", "v(d)", "@m1[id]"
	Cols  [][]float64 // the columns in the order of Names, SI units, all of one length
}

// Col returns the column called name.
func (t *Table) Col(name string) ([]float64, error) {
	for i, n := range t.Names {
		if n == name {
			return t.Cols[i], nil
		}
	}
	return nil, fmt.Errorf("no column %q (have %s)", name, strings.Join(t.Names, ", "))
}

// Columns returns the named columns, in order, or the first missing one's
// error.
func (t *Table) Columns(names ...string) ([][]float64, error) {
	cols := make([][]float64, len(names))
	for i, n := range names {
		c, err := t.Col(n)
		if err != nil {
			return nil, err
		}
		cols[i] = c
	}
	return cols, nil
}

// Len is the number of rows.
func (t *Table) Len() int {
	if len(t.Cols) == 0 {
		return 0
	}
	return len(t.Cols[0])
}

// deckPrologue is prepended to every control block: full-precision output
// with one scale column and a header line.
const deckPrologue = "set wr_singlescale\nset wr_vecnames\nset noaskquit\n"

// Run writes the deck into a fresh temporary directory, runs ngspice there
// in batch mode (without the user's start-up file) under a deadline, and
// reads the wrdata files named in outputs (relative names, written by the
// deck into its working directory). The deck must end its control block
// with "quit 0"; a non-zero exit, a missing output file or an error line in
// ngspice's output is an error that quotes the output.
func (r *Runner) Run(ctx context.Context, name, deck string, outputs ...string) (map[string]*Table, error) {
	t, _, err := r.RunJob(ctx, Job{Name: name, Deck: deck, Outputs: outputs})
	return t, err
}

// RunJob is Run for a job with files beside the deck and a compatibility
// mode. It returns the scratch directory when it was kept (Keep, or
// KeepFailed on an error), else "".
func (r *Runner) RunJob(ctx context.Context, j Job) (map[string]*Table, string, error) {
	name := j.Name
	timeout := r.Timeout
	if timeout <= 0 {
		timeout = 60 * time.Second
	}
	dir, err := os.MkdirTemp("", "swrank-spice-")
	if err != nil {
		return nil, "", fmt.Errorf("%s: %w", name, err)
	}
	keep := r.Keep
	defer func() {
		if !keep {
			os.RemoveAll(dir)
		}
	}()
	fail := func(err error) (map[string]*Table, string, error) {
		if r.KeepFailed || r.Keep {
			keep = true
			return nil, dir, fmt.Errorf("%w (deck kept in %s)", err, dir)
		}
		return nil, "", err
	}
	files := map[string][]byte{"deck.cir": []byte(j.Deck)}
	for n, b := range j.Files {
		files[n] = b
	}
	args := []string{"-b", "-n", "deck.cir"}
	if j.Compat != "" {
		files[".spiceinit"] = []byte("set ngbehavior=" + j.Compat + "\n")
		args = []string{"-b", "deck.cir"} // reads the .spiceinit of its working directory
	}
	for n, b := range files {
		if err := os.WriteFile(filepath.Join(dir, n), b, 0o644); err != nil {
			return fail(fmt.Errorf("%s: %w", name, err))
		}
	}
	ctx, cancel := context.WithTimeout(ctx, timeout)
	defer cancel()
	bin := r.Bin
	// Under coreutils timeout as well, so that a run outlives neither its
	// deadline nor this process (the signal reaches the whole group).
	if tp, err := exec.LookPath("timeout"); err == nil {
		secs := strconv.FormatFloat(timeout.Seconds(), 'f', 1, 64)
		args = append([]string{"--kill-after=2", secs, r.Bin}, args...)
		bin = tp
	}
	cmd := exec.CommandContext(ctx, bin, args...)
	cmd.Dir = dir
	if j.Compat != "" {
		cmd.Env = append(os.Environ(), "HOME="+dir) // no user start-up file besides ours
	}
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	cmd.Cancel = func() error { return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL) }
	cmd.WaitDelay = 2 * time.Second
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	runErr := cmd.Run()
	if ctx.Err() != nil {
		return fail(fmt.Errorf("%s: ngspice did not finish within %v", name, timeout))
	}
	if runErr != nil {
		return fail(fmt.Errorf("%s: ngspice: %w\n%s", name, runErr, tail(out.String(), 2000)))
	}
	if msg := errorLines(out.String()); msg != "" {
		return fail(fmt.Errorf("%s: ngspice reported: %s", name, msg))
	}
	res := make(map[string]*Table, len(j.Outputs))
	for _, o := range j.Outputs {
		t, err := readTable(filepath.Join(dir, o))
		if err != nil {
			return fail(fmt.Errorf("%s: %w\n%s", name, err, tail(out.String(), 2000)))
		}
		res[o] = t
	}
	if keep {
		return res, dir, nil
	}
	return res, "", nil
}

// errorLines returns ngspice's error and failure lines, joined, or "".
func errorLines(s string) string {
	var bad []string
	sc := bufio.NewScanner(strings.NewReader(s))
	for sc.Scan() {
		l := strings.TrimSpace(sc.Text())
		low := strings.ToLower(l)
		if strings.HasPrefix(low, "error") || strings.Contains(low, "timestep too small") ||
			strings.Contains(low, "simulation(s) aborted") || strings.Contains(low, "singular matrix") ||
			strings.Contains(low, "unknown parameter") || strings.Contains(low, "no such vector") {
			bad = append(bad, l)
		}
	}
	return strings.Join(bad, "; ")
}

func tail(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return "…" + s[len(s)-n:]
}

// readTable parses a wrdata file: a header of names, then rows of numbers.
func readTable(path string) (*Table, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("reading ngspice output: %w", err)
	}
	sc := bufio.NewScanner(bytes.NewReader(b))
	sc.Buffer(make([]byte, 1<<16), 1<<22)
	t := &Table{}
	line := 0
	for sc.Scan() {
		line++
		f := strings.Fields(sc.Text())
		if len(f) == 0 {
			continue
		}
		if t.Names == nil {
			t.Names = f
			t.Cols = make([][]float64, len(f))
			continue
		}
		if len(f) != len(t.Names) {
			return nil, fmt.Errorf("%s:%d: %d fields, want %d", filepath.Base(path), line, len(f), len(t.Names))
		}
		for i, s := range f {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				return nil, fmt.Errorf("%s:%d: field %d (%s): %w", filepath.Base(path), line, i+1, t.Names[i], err)
			}
			t.Cols[i] = append(t.Cols[i], v)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s: %w", filepath.Base(path), err)
	}
	if t.Len() == 0 {
		return nil, fmt.Errorf("%s: no data rows", filepath.Base(path))
	}
	return t, nil
}
