package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"
)

// writeJSON writes v as indented JSON followed by a newline.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// writeCSV writes a header and rows as RFC 4180 CSV.
func writeCSV(w io.Writer, header []string, rows [][]string) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	if err := cw.WriteAll(rows); err != nil {
		return err
	}
	cw.Flush()
	return cw.Error()
}

// table renders aligned text columns.
type table struct {
	tw *tabwriter.Writer
}

func newTable(w io.Writer) *table {
	return &table{tw: tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)}
}

func (t *table) row(cells ...string) { fmt.Fprintln(t.tw, strings.Join(cells, "\t")) }
func (t *table) flush() error        { return t.tw.Flush() }

// outputFile is a file the command is about to write: it refuses to write
// over any of the command's inputs and writes atomically (a temporary file
// in the same directory, renamed over the target when complete).
type outputFile struct {
	path   string
	inputs []string
}

// checkNotInput returns an error when path names one of inputs (the same
// file, by identity where it exists, else by cleaned absolute path).
func checkNotInput(flag, path string, inputs []string) error {
	abs, _ := filepath.Abs(path)
	st, statErr := os.Stat(path)
	for _, in := range inputs {
		if in == "" {
			continue
		}
		inAbs, _ := filepath.Abs(in)
		if inAbs == abs {
			return usagef("%s: %s is an input of this run; choose another output file", flag, path)
		}
		if statErr == nil {
			if ist, err := os.Stat(in); err == nil && os.SameFile(st, ist) {
				return usagef("%s: %s is an input of this run; choose another output file", flag, path)
			}
		}
	}
	return nil
}

// writeFileAtomic writes data to path through a temporary file in the same
// directory and a rename, so a reader never sees a half-written file and an
// interrupted run leaves the old file in place. It refuses to write over any
// of inputs.
func writeFileAtomic(path string, data []byte, inputs []string) error {
	if err := checkNotInput("--out", path, inputs); err != nil {
		return err
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	name := tmp.Name()
	defer os.Remove(name) // no-op after a successful rename
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Chmod(name, 0o644); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Rename(name, path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// renderTo renders with fn into a buffer and writes it atomically to path.
func renderTo(path string, inputs []string, fn func(w io.Writer) error) error {
	var buf bytes.Buffer
	if err := fn(&buf); err != nil {
		return err
	}
	return writeFileAtomic(path, buf.Bytes(), inputs)
}

// extension returns the lower-case extension of path without the dot.
func extension(path string) string {
	return strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), ".")
}

// emit writes a result to stdout in the --format asked for: res as JSON,
// csv for --format csv, text otherwise.
func (g *globals) emit(res any, csv func(io.Writer) error, text func(io.Writer)) error {
	switch g.format {
	case "json":
		return writeJSON(g.stdout, res)
	case "csv":
		return csv(g.stdout)
	}
	text(g.stdout)
	return nil
}

// wrote tells on stderr that -o was written.
func (g *globals) wrote() {
	if g.out != "" {
		fmt.Fprintf(g.stderr, "mastlink: wrote %s\n", g.out)
	}
}
