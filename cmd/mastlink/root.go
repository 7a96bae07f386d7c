package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/cobra"
)

// version is set at build time with -ldflags "-X main.version=…".
var version = "0.1.0-dev"

// globals holds the flags every command shares and the streams it writes to.
type globals struct {
	format  string // text, json or csv
	dem     string // DEM directory or files (comma separated); also MASTLINK_DEM
	units   string // metric or imperial (text output only)
	out     string // output file, format from its extension
	cacheMB int    // tile cache size in MiB; also MASTLINK_CACHE_MB

	stdin          io.Reader
	stdout, stderr io.Writer
}

// usageError marks an error as bad usage (exit code 2).
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

// run builds the command tree, runs it with args and returns the exit code:
// 0 success, 1 computation or data error, 2 bad usage.
func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	g := &globals{stdin: stdin, stdout: stdout, stderr: stderr}
	root := newRootCmd(g)
	root.SetArgs(negativePoints(args))
	root.SetIn(stdin)
	root.SetOut(stdout)
	root.SetErr(stderr)
	err := root.ExecuteContext(ctx)
	if err == nil {
		return 0
	}
	fmt.Fprintf(stderr, "mastlink: %s\n", errorLine(err))
	var ue usageError
	if errors.As(err, &ue) || isCobraUsage(err) {
		return 2
	}
	return 1
}

// negativePoints lets positional points with a negative latitude, such as
// `mastlink elevation -48.5,-123.9`, through the flag parser: a bare token
// that starts with '-' and a digit and holds a comma is never a flag, so it
// is moved after a "--" (keeping the points in order). A token that follows
// a flag awaiting its value is left where it is.
func negativePoints(args []string) []string {
	var keep, points []string
	prevPoint := false
	for i, a := range args {
		if a == "--" {
			keep = append(keep, args[i:]...)
			break
		}
		isPoint := len(a) > 2 && a[0] == '-' && (a[1] >= '0' && a[1] <= '9' || a[1] == '.') && strings.Contains(a, ",")
		prevFlag := i > 0 && !prevPoint && strings.HasPrefix(args[i-1], "-") && !strings.Contains(args[i-1], "=") && !isBoolFlag(args[i-1])
		prevPoint = isPoint && !prevFlag
		if prevPoint {
			points = append(points, a)
			continue
		}
		keep = append(keep, a)
	}
	if len(points) == 0 {
		return args
	}
	out := keep
	hasDash := false
	for _, a := range keep {
		if a == "--" {
			hasDash = true
		}
	}
	if !hasDash {
		out = append(out, "--")
	}
	return append(out, points...)
}

// isBoolFlag reports whether a token is one of the boolean flags, which take
// no value.
func isBoolFlag(tok string) bool {
	switch tok {
	case "--list", "-h", "--help", "--version":
		return true
	}
	return false
}

// errorLine is err as the one line printed: its first line, with cobra's
// suggestions for a mistyped command kept on it.
func errorLine(err error) string {
	msg := err.Error()
	if strings.HasPrefix(msg, "unknown command") {
		if i := strings.Index(msg, "Did you mean this?"); i >= 0 {
			alts := strings.Fields(msg[i+len("Did you mean this?"):])
			return firstLine(msg) + "; did you mean " + strings.Join(alts, " or ") + "?"
		}
		return firstLine(msg) + " (see mastlink --help)"
	}
	return firstLine(msg)
}

func firstLine(s string) string {
	s = strings.TrimSpace(s)
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return s[:i]
	}
	return s
}

// isCobraUsage recognises the argument and flag errors cobra itself returns.
func isCobraUsage(err error) bool {
	msg := err.Error()
	for _, p := range []string{"unknown command", "unknown flag", "unknown shorthand flag", "flag needs an argument", "invalid argument", "accepts ", "requires at least", "requires at most", "required flag", "if any flags in the group", "none of the others can be"} {
		if strings.Contains(msg, p) {
			return true
		}
	}
	return false
}

func newRootCmd(g *globals) *cobra.Command {
	root := &cobra.Command{
		Use:   "mastlink",
		Short: "Plan portable VHF/UHF radio deployments over real terrain",
		Long: `mastlink plans portable VHF/UHF radio deployments: link budgets over terrain,
mast and coax trade-offs, coverage along routes, ranking of candidate sites and
RF-exposure keep-out distances. It works offline from SRTM or GeoTIFF elevation
data and GPX waypoints.

Quantities take units (12m, 40ft, 5W, 37dBm, 146.52MHz, 2.15dBi, 0.25uV, 90%);
a bare number takes the default unit named in each flag's help.`,
		Version:                    version,
		SuggestionsMinimumDistance: 2, // "plna", "sties", "feedlien" find plan, sites, feedline
		SilenceUsage:               true,
		SilenceErrors:              true,
		PersistentPreRunE: func(cmd *cobra.Command, args []string) error {
			return g.validate(cmd)
		},
	}
	root.SetFlagErrorFunc(flagError)
	pf := root.PersistentFlags()
	pf.StringVar(&g.format, "format", "text", "output format: text, json or csv (csv where the output is a table)")
	pf.StringVar(&g.dem, "dem", os.Getenv("MASTLINK_DEM"), "elevation data: a directory or files of SRTM .hgt/.hgt.zip/.hgt.gz or GeoTIFF, comma separated (env MASTLINK_DEM)")
	pf.StringVar(&g.units, "units", "metric", "units in text output: metric or imperial (JSON is always SI)")
	pf.IntVar(&g.cacheMB, "cache-mb", envInt("MASTLINK_CACHE_MB", 1024), "memory for cached elevation tiles, MiB (env MASTLINK_CACHE_MB)")

	root.AddCommand(
		newElevationCmd(g),
		newProfileCmd(g),
		newHorizonCmd(g),
		newFeedlineCmd(g),
		newExposureCmd(g),
		newLinkCmd(g),
		newPlanCmd(g),
		newMastCmd(g),
		newRouteCmd(g),
		newSitesCmd(g),
		newCoverageCmd(g),
		newAntennaCmd(g),
		newRelayCmd(g),
		newVersionCmd(g),
	)
	addOutFlags(root, g)
	return root
}

// outHelp is the -o/--out help of each command that writes a file: what it
// writes and the extensions it takes. Commands listed in noOut write no
// file; any other command gets outHelpDefault.
var outHelp = map[string]string{
	"plan":     "write links.geojson, keepout.geojson, plan.gpx and links.csv (and route-N.geojson, sites.geojson) into the directory `DIR` (created if needed)",
	"link":     "also write the result to `FILE`: .json, .csv or .txt",
	"feedline": "also write the result to `FILE`: .json, .csv or .txt",
	"horizon":  "also write the result to `FILE`: .json, .csv or .txt",
	"profile":  "write the profile to `FILE`: .csv (the samples), .svg or .png (a chart)",
	"exposure": "write the keep-out circles to `FILE`: .geojson or .gpx (needs --at)",
	"mast":     "also write the sweep to `FILE`: .csv or .json",
	"route":    "also write the coverage to `FILE`: .geojson (covered pieces), .gpx (track and waypoints) or .csv (every point)",
	"sites":    "also write the ranking to `FILE`: .geojson (points) or .csv",
}

const outHelpDefault = "write the result to `FILE`; the format follows its extension"

var noOut = map[string]bool{"elevation": true, "version": true}

// addOutFlags gives every command that writes a file its own -o/--out,
// with help that says what it writes there. Never over an input file;
// always through writeFileAtomic.
func addOutFlags(root *cobra.Command, g *globals) {
	for _, c := range root.Commands() {
		if noOut[c.Name()] {
			continue
		}
		help, ok := outHelp[c.Name()]
		if !ok {
			help = outHelpDefault
		}
		c.Flags().StringVarP(&g.out, "out", "o", "", help)
	}
}

// flagError turns the flag parser's errors into usage errors (exit 2); -o
// given to a command that writes no file says so.
func flagError(c *cobra.Command, err error) error {
	msg := err.Error()
	if strings.Contains(msg, "unknown shorthand flag: 'o'") || strings.Contains(msg, "unknown flag: --out") {
		return usagef("-o: mastlink %s writes no file; its result goes to stdout (redirect it with > FILE)", c.Name())
	}
	return usageError{err}
}

func envInt(name string, def int) int {
	v := os.Getenv(name)
	if v == "" {
		return def
	}
	var n int
	if _, err := fmt.Sscanf(v, "%d", &n); err != nil || n <= 0 {
		return def
	}
	return n
}

func (g *globals) validate(cmd *cobra.Command) error {
	switch g.format {
	case "text", "json", "csv":
	default:
		return usagef("--format: %q is not a format (use text, json or csv)", g.format)
	}
	switch g.units {
	case "metric", "imperial":
	default:
		return usagef("--units: %q is not a unit system (use metric or imperial)", g.units)
	}
	if g.cacheMB <= 0 {
		return usagef("--cache-mb: must be a positive number of MiB")
	}
	return nil
}

func (g *globals) imperial() bool { return g.units == "imperial" }

func newVersionCmd(g *globals) *cobra.Command {
	return &cobra.Command{
		Use:   "version",
		Short: "Print the mastlink version",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return g.emit(map[string]string{"version": version}, nil, func(w io.Writer) error {
				_, err := fmt.Fprintf(w, "mastlink %s\n", version)
				return err
			})
		},
	}
}
