package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/mastlink/mastlink/plan/units"
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
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return fmt.Errorf("writing %s: it is a directory; give a file name", path)
	}
	dir := filepath.Dir(path)
	// The temporary file's name never reaches a message: errors name path
	// and the cause alone.
	fail := func(err error) error { return fmt.Errorf("writing %s: %w", path, bareCause(err)) }
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fail(err)
	}
	name := tmp.Name()
	defer os.Remove(name) // no-op after a successful rename
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		return fail(err)
	}
	if err := os.Chmod(name, 0o644); err != nil {
		return fail(err)
	}
	if err := os.Rename(name, path); err != nil {
		return fail(err)
	}
	return nil
}

// bareCause strips the file names from an error of the os package
// (*os.PathError, *os.LinkError), leaving its cause ("permission denied").
func bareCause(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
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

// checkOut checks -o before any work: its extension must be one of kinds
// and it must not name one of inputs. It returns the extension ("" without
// -o).
func (g *globals) checkOut(inputs []string, kinds ...string) (string, error) {
	if g.out == "" {
		return "", nil
	}
	kind, err := outputKind(g.out, kinds...)
	if err != nil {
		return "", err
	}
	return kind, checkNotInput("-o", g.out, inputs)
}

// emitFile writes a command's result like emit and, with -o, to that file
// as well (atomically, never over one of inputs): .json, .csv (when the
// command has a table) or .txt (the text, metric or imperial as asked).
func (g *globals) emitFile(inputs []string, res any, csv, text func(io.Writer) error) error {
	if g.out != "" {
		var fn func(io.Writer) error
		switch extension(g.out) {
		case "json":
			fn = func(w io.Writer) error { return writeJSON(w, res) }
		case "csv":
			fn = csv
		case "txt":
			fn = text
		}
		if fn == nil {
			return usagef("-o: %q: give a file ending in .json, .csv or .txt", g.out)
		}
		if err := renderTo(g.out, inputs, fn); err != nil {
			return err
		}
		g.wrote()
	}
	return g.emit(res, csv, text)
}

// emit writes a command's result to stdout in the --format asked for: res
// as JSON, csv for --format csv (text when the command has no table to
// give, csv nil), text otherwise. Every command's stdout goes through here.
func (g *globals) emit(res any, csv, text func(io.Writer) error) error {
	switch g.format {
	case "json":
		return writeJSON(g.stdout, res)
	case "csv":
		if csv != nil {
			return csv(g.stdout)
		}
	}
	return text(g.stdout)
}

// wrote tells on stderr that -o was written.
func (g *globals) wrote() {
	if g.out != "" {
		fmt.Fprintf(g.stderr, "mastlink: wrote %s\n", g.out)
	}
}

// Number formatters for text and CSV output.

// f1, f2 and f4 render a number with 1, 2 or 4 decimals (CSV cells).
func f1(v float64) string { return fmt.Sprintf("%.1f", v) }
func f2(v float64) string { return fmt.Sprintf("%.2f", v) }
func f4(v float64) string { return fmt.Sprintf("%.4f", v) }

// dbm, db and dbi render a level, a loss or gain, and an antenna gain with
// a sign and one decimal: "+36.0 dBm", "-2.5 dB", "+2.2 dBi".
func dbm(v float64) string { return signed(v) + " dBm" }
func db(v float64) string  { return signed(v) + " dB" }
func dbi(v float64) string { return signed(v) + " dBi" }

// signed formats v with one decimal and a sign, never as "-0.0".
func signed(v float64) string {
	if math.Abs(v) < 0.05 {
		return "0.0"
	}
	return fmt.Sprintf("%+.1f", v)
}

// probability renders a probability 0–1 as a percentage with one decimal,
// saturating at "over 99.9 %" and "under 0.1 %".
func probability(p float64) string {
	switch {
	case p > 0.999:
		return "over 99.9 %"
	case p < 0.001:
		return "under 0.1 %"
	}
	return fmt.Sprintf("%.1f %%", 100*p)
}

// percent renders a fraction 0–1 as a whole percentage, "90 %".
func percent(f float64) string { return fmt.Sprintf("%.0f %%", 100*f) }

// up rounds a safety distance up to the next 0.1 m (so a keep-out is never
// shown shorter than computed).
func up(m float64) float64 { return math.Ceil(m*10-1e-9) / 10 }

// round2 rounds to 2 decimals, for GeoJSON properties.
func round2(v float64) float64 { return math.Round(v*100) / 100 }

// deg formats degrees with 7 decimals (about 1 cm).
func deg(v float64) string { return strconv.FormatFloat(v, 'f', 7, 64) }

// distance renders a distance along a path in km (or mi) with 2 decimals,
// so a column of them lines up.
func distance(m float64, im bool) string {
	if im {
		return fmt.Sprintf("%.2f mi", m/units.MetresPerMile)
	}
	return fmt.Sprintf("%.2f km", m/1000)
}
