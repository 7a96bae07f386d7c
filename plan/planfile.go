package plan

import (
	"bytes"
	"errors"
	"fmt"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
	"go.yaml.in/yaml/v3"
)

// ErrPlanFile is wrapped by every error in a plan file.
var ErrPlanFile = errors.New("plan file")

// PlanError is an error at a place in a plan file: the file, the line (1-based,
// 0 when the file as a whole is at fault) and the field path.
type PlanError struct {
	File  string
	Line  int
	Field string // e.g. "stations[0].feedline.cable"; "" for the document
	Err   error  // what is wrong, often a *units.QuantityError or a catalog error
}

// Error renders "plan.yaml:14: feedline.cable: unknown cable …".
func (e *PlanError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		b.WriteString(":" + strconv.Itoa(e.Line))
	}
	b.WriteString(": ")
	if e.Field != "" {
		b.WriteString(e.Field + ": ")
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

// Unwrap returns both ErrPlanFile and the underlying cause.
func (e *PlanError) Unwrap() []error { return []error{ErrPlanFile, e.Err} }

// ReadPlan reads and validates the plan file at path. Every error is a
// *PlanError naming the file, line and field and saying what would fix it.
func ReadPlan(path string) (*Plan, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, &PlanError{File: path, Err: fmt.Errorf("cannot read the plan: %w", unwrapPathError(err))}
	}
	return ParsePlan(data, path)
}

func unwrapPathError(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// ParsePlan parses a plan document; path names it in errors and anchors the
// relative paths inside it.
func ParsePlan(data []byte, path string) (*Plan, error) {
	p := &planParser{file: path, dir: filepath.Dir(path)}
	return p.parse(data)
}

type planParser struct {
	file, dir string
	plan      *Plan
}

func (p *planParser) errf(n *yaml.Node, field, format string, a ...any) error {
	line := 0
	if n != nil {
		line = n.Line
	}
	return &PlanError{File: p.file, Line: line, Field: field, Err: fmt.Errorf(format, a...)}
}

func (p *planParser) wrap(n *yaml.Node, field string, err error) error {
	line := 0
	if n != nil {
		line = n.Line
	}
	return &PlanError{File: p.file, Line: line, Field: field, Err: err}
}

// fields checks that n is a mapping with only the allowed keys and returns
// its values by key.
func (p *planParser) fields(n *yaml.Node, field string, allowed ...string) (map[string]*yaml.Node, error) {
	if n.Kind != yaml.MappingNode {
		what := "a mapping of " + strings.Join(allowed, ", ")
		return nil, p.errf(n, field, "expected %s, found %s", what, describe(n))
	}
	out := make(map[string]*yaml.Node, len(n.Content)/2)
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		key := k.Value
		ok := false
		for _, a := range allowed {
			if a == key {
				ok = true
				break
			}
		}
		sub := joinField(field, key)
		if !ok {
			return nil, p.errf(k, sub, "unknown field (known here: %s)", strings.Join(allowed, ", "))
		}
		if _, dup := out[key]; dup {
			return nil, p.errf(k, sub, "given twice")
		}
		out[key] = v
	}
	return out, nil
}

func joinField(parent, key string) string {
	if parent == "" {
		return key
	}
	return parent + "." + key
}

func describe(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		if n.Tag == "!!null" {
			return "nothing"
		}
		return quoteClip(n.Value)
	case yaml.AliasNode:
		return "an alias"
	}
	return "something else"
}

// scalar returns the text of a scalar node.
func (p *planParser) scalar(n *yaml.Node, field string) (string, error) {
	if n.Kind != yaml.ScalarNode || n.Tag == "!!null" {
		return "", p.errf(n, field, "expected a value, found %s", describe(n))
	}
	return strings.TrimSpace(n.Value), nil
}

// quantity parses a scalar with fn, wrapping the error with the position.
func (p *planParser) quantity(n *yaml.Node, field string, fn func(string) (float64, error)) (float64, error) {
	s, err := p.scalar(n, field)
	if err != nil {
		return 0, err
	}
	v, err := fn(s)
	if err != nil {
		return 0, p.wrap(n, field, err)
	}
	return v, nil
}

func (p *planParser) path(n *yaml.Node, field string) (string, error) {
	s, err := p.scalar(n, field)
	if err != nil {
		return "", err
	}
	if s == "" {
		return "", p.errf(n, field, "empty path")
	}
	if !filepath.IsAbs(s) {
		s = filepath.Join(p.dir, s)
	}
	return s, nil
}

// paths accepts one path or a list of paths.
func (p *planParser) paths(n *yaml.Node, field string) ([]string, error) {
	if n.Kind == yaml.SequenceNode {
		var out []string
		for i, c := range n.Content {
			s, err := p.path(c, fmt.Sprintf("%s[%d]", field, i))
			if err != nil {
				return nil, err
			}
			out = append(out, s)
		}
		return out, nil
	}
	s, err := p.path(n, field)
	if err != nil {
		return nil, err
	}
	return []string{s}, nil
}

var topFields = []string{"name", "area", "date", "timezone", "briefing", "frequency", "terrain", "waypoints", "require", "k", "model", "itm", "polarization", "ground", "defaults", "stations", "targets", "mast", "routes", "sites", "roads", "relays"}

func (p *planParser) parse(data []byte) (*Plan, error) {
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, p.errf(nil, "", "the plan is empty (start from examples/valley/plan.yaml)")
	}
	if looksBinary(data) {
		return nil, p.errf(nil, "", "not a YAML plan: the file holds binary data (start from examples/valley/plan.yaml)")
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return nil, p.yamlError(err)
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) == 0 {
		return nil, p.errf(nil, "", "the plan is empty (start from examples/valley/plan.yaml)")
	}
	root := doc.Content[0]
	if root.Kind != yaml.MappingNode {
		return nil, p.errf(root, "", "not a YAML plan: expected fields such as name, frequency, stations and targets, found %s (start from examples/valley/plan.yaml)", describe(root))
	}
	f, err := p.fields(root, "", topFields...)
	if err != nil {
		return nil, err
	}
	pl := &Plan{Path: p.file, K: propagation.DefaultKFactor, Model: propagation.Terrain{}, Polarization: propagation.Vertical,
		Ground: propagation.Land, InputFiles: []string{p.file}}
	p.plan = pl
	pl.Require = DefaultRequirement() // unless require: asks for something

	if n := f["name"]; n != nil {
		if pl.Name, err = p.scalar(n, "name"); err != nil {
			return nil, err
		}
	}
	if err := p.briefingFields(f, pl); err != nil {
		return nil, err
	}
	if n := f["frequency"]; n != nil {
		if pl.FreqMHz, err = p.quantity(n, "frequency", units.ParseFreqMHz); err != nil {
			return nil, err
		}
	}
	if n := f["terrain"]; n != nil {
		if pl.Terrain, err = p.paths(n, "terrain"); err != nil {
			return nil, err
		}
		pl.TerrainAt = n.Line
		for _, t := range pl.Terrain {
			if _, err := os.Stat(t); err != nil {
				return nil, p.errf(n, "terrain", "%s: %v (give a folder of .hgt or GeoTIFF files, relative to the plan)", t, unwrapPathError(err))
			}
		}
	}
	if n := f["waypoints"]; n != nil {
		wp, err := p.path(n, "waypoints")
		if err != nil {
			return nil, err
		}
		g, err := gpx.Read(wp)
		if err != nil {
			return nil, p.wrap(n, "waypoints", err)
		}
		pl.Waypoints = g
		pl.InputFiles = append(pl.InputFiles, wp)
	}
	if n := f["require"]; n != nil {
		if err := p.require(n, &pl.Require); err != nil {
			return nil, err
		}
	}
	if n := f["k"]; n != nil {
		if pl.K, err = p.quantity(n, "k", units.ParseKFactor); err != nil {
			return nil, err
		}
	}
	if n := f["model"]; n != nil {
		name, err := p.scalar(n, "model")
		if err != nil {
			return nil, err
		}
		if pl.Model, err = propagation.ModelByName(name); err != nil {
			return nil, p.wrap(n, "model", err)
		}
	}
	if n := f["polarization"]; n != nil {
		s, err := p.scalar(n, "polarization")
		if err != nil {
			return nil, err
		}
		if pl.Polarization, err = ParsePolarization(s); err != nil {
			return nil, p.wrap(n, "polarization", err)
		}
	}
	if n := f["ground"]; n != nil {
		s, err := p.scalar(n, "ground")
		if err != nil {
			return nil, err
		}
		if pl.Ground, err = ParseGround(s); err != nil {
			return nil, p.wrap(n, "ground", err)
		}
	}
	if err := p.itm(f); err != nil {
		return nil, err
	}
	def := kit{antenna: Antenna{GainDBi: 0, HeightM: 1.5}} // a handheld at chest height; radios must be given
	if n := f["defaults"]; n != nil {
		if err := p.defaults(n, &def); err != nil {
			return nil, err
		}
	}
	pl.Defaults = End{Radio: def.radio, Antenna: def.antenna, Feedline: def.line}
	n := f["stations"]
	if n == nil || n.Kind != yaml.SequenceNode || len(n.Content) == 0 {
		return nil, p.errf(orNode(n, root), "stations", "the plan needs at least one station (a list of name, at, radio, antenna, feedline)")
	}
	for i, c := range n.Content {
		st, err := p.station(c, fmt.Sprintf("stations[%d]", i), def)
		if err != nil {
			return nil, err
		}
		pl.Stations = append(pl.Stations, st)
	}
	if len(pl.Stations) > 1 && pl.FreqMHz == 0 {
		return nil, p.errf(n, "frequency", "missing: with %d stations give frequency: at the top of the plan (the stations are checked against each other on it)", len(pl.Stations))
	}
	if n := f["targets"]; n != nil {
		if n.Kind != yaml.SequenceNode {
			return nil, p.errf(n, "targets", "expected a list of targets, found %s", describe(n))
		}
		for i, c := range n.Content {
			t, err := p.target(c, fmt.Sprintf("targets[%d]", i), def)
			if err != nil {
				return nil, err
			}
			pl.Targets = append(pl.Targets, t)
		}
	}
	if n := f["mast"]; n != nil {
		m, err := p.mast(n)
		if err != nil {
			return nil, err
		}
		pl.Mast = m
	}
	if n := f["relays"]; n != nil {
		if n.Kind != yaml.SequenceNode {
			return nil, p.errf(n, "relays", "expected a list of relays ({between: A, and: B, height: 6m}), found %s", describe(n))
		}
		for i, c := range n.Content {
			r, err := p.relay(c, fmt.Sprintf("relays[%d]", i))
			if err != nil {
				return nil, err
			}
			pl.Relays = append(pl.Relays, r)
		}
	}
	for _, key := range []string{"routes", "sites", "roads"} {
		n := f[key]
		if n == nil {
			continue
		}
		files, err := p.paths(n, key)
		if err != nil {
			return nil, err
		}
		for _, fp := range files {
			if _, err := os.Stat(fp); err != nil {
				return nil, p.errf(n, key, "%s: %v", fp, unwrapPathError(err))
			}
		}
		switch key {
		case "routes":
			pl.Routes = files
		case "sites":
			pl.Sites = files
		default:
			pl.Roads = files
		}
		pl.InputFiles = append(pl.InputFiles, files...)
	}
	if len(pl.Targets) == 0 && len(pl.Routes) == 0 && len(pl.Sites) == 0 {
		return nil, p.errf(root, "targets", "the plan has no targets: list the repeaters, net control and teams to reach")
	}
	return pl, nil
}

func orNode(n, fallback *yaml.Node) *yaml.Node {
	if n != nil {
		return n
	}
	return fallback
}

func (p *planParser) yamlError(err error) error {
	msg := err.Error()
	msg = strings.TrimPrefix(msg, "yaml: ")
	line := 0
	// yaml.v3 reports "line N: …" or "yaml: unmarshal errors:\n  line N: …".
	if i := strings.Index(msg, "line "); i >= 0 {
		rest := msg[i+5:]
		j := 0
		for j < len(rest) && rest[j] >= '0' && rest[j] <= '9' {
			j++
		}
		if n, e := strconv.Atoi(rest[:j]); e == nil {
			line = n
			msg = strings.TrimLeft(strings.TrimPrefix(rest[j:], ":"), " ")
		}
	}
	return &PlanError{File: p.file, Line: line, Err: fmt.Errorf("not a YAML plan: %s", clipQuoted(firstLineOf(msg)))}
}

// maxEcho is the most characters of the user's input an error repeats.
const maxEcho = 60

// clip shortens s to maxEcho characters, ending it with "…" when cut.
func clip(s string) string {
	r := []rune(s)
	if len(r) <= maxEcho {
		return s
	}
	return string(r[:maxEcho-1]) + "…"
}

// quoteClip quotes s for an error message, at most maxEcho characters of
// it.
func quoteClip(s string) string { return strconv.Quote(clip(s)) }

// clipQuoted shortens the input the YAML parser echoes between backquotes
// in its messages.
func clipQuoted(msg string) string {
	var b strings.Builder
	for {
		i := strings.IndexByte(msg, '`')
		if i < 0 {
			break
		}
		j := strings.IndexByte(msg[i+1:], '`')
		if j < 0 {
			break
		}
		b.WriteString(msg[:i+1])
		b.WriteString(strings.Trim(strconv.Quote(clip(msg[i+1:i+1+j])), `"`))
		b.WriteByte('`')
		msg = msg[i+1+j+1:]
	}
	b.WriteString(msg)
	return b.String()
}

// looksBinary reports whether data looks like something other than text: a NUL
// byte, invalid UTF-8, or control characters other than tab, CR and LF in
// its first 8 KiB.
func looksBinary(data []byte) bool {
	head := data
	if len(head) > 8<<10 {
		head = head[:8<<10]
	}
	if bytes.IndexByte(head, 0) >= 0 {
		return true
	}
	whole := head
	if len(head) < len(data) {
		whole = head[:len(head)-utf8.UTFMax] // a character may be cut at the end
	}
	if !utf8.Valid(whole) {
		return true
	}
	for _, c := range head {
		if c < 0x20 && c != '\t' && c != '\n' && c != '\r' {
			return true
		}
	}
	return false
}

func firstLineOf(s string) string {
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return s[:i]
	}
	return s
}

func (p *planParser) choice(n *yaml.Node, field string, options ...string) (string, error) {
	s, err := p.scalar(n, field)
	if err != nil {
		return "", err
	}
	ls := strings.ToLower(s)
	for _, o := range options {
		if ls == o {
			return o, nil
		}
	}
	return "", p.errf(n, field, "%q is not one of %s", s, strings.Join(options, ", "))
}

// require reads require: with RequirementOptions, the parser the commands
// use too.
func (p *planParser) require(n *yaml.Node, r *Requirement) error {
	f, err := p.fields(n, "require", "margin", "reliability", "sigma")
	if err != nil {
		return err
	}
	text, err := p.texts(f, "require")
	if err != nil {
		return err
	}
	o := RequirementOptions{Margin: text["margin"], Reliability: text["reliability"], Sigma: text["sigma"]}
	return p.options(n, "require", f, o.Apply(r))
}

// itmKeys are the keys of a plan's itm: section: the ITMOptions keys and
// the two variability switches.
var itmKeys = []string{ITMOptClimate, ITMOptRefractivity, ITMOptSurfaceRefractivity, ITMOptPermittivity, ITMOptConductivity,
	ITMOptVariability, ITMOptTime, ITMOptLocation, ITMOptSituation, ITMOptConfidence, "location_variability", "situation_variability"}

// itm reads the itm: section (with ITMOptions, the parser the commands use
// too) into the plan's Longley–Rice ITM model, and makes the requirement
// and the model agree (ITMRequirement). f is the top level. With model:
// itm the plan's k, ground and require.sigma are refused: the ITM takes
// the earth's curvature from the refractivity, the ground from its own
// permittivity and conductivity, and the location variability is its own.
func (p *planParser) itm(f map[string]*yaml.Node) error {
	pl := p.plan
	m, isITM := pl.Model.(propagation.ITM)
	n := f["itm"]
	if !isITM {
		if n != nil {
			return p.errf(n, "itm", "the Longley–Rice ITM settings need model: itm (the model is %s)", pl.Model.Name())
		}
		return nil
	}
	for _, c := range []struct{ key, why string }{
		{"k", "the ITM takes the earth's curvature from its refractivity (itm: {refractivity: 301})"},
		{"ground", "give the ITM's ground as itm: {permittivity: 15, conductivity: 0.005} (sea water: 80 and 5)"},
	} {
		if v := f[c.key]; v != nil {
			return p.errf(v, c.key, "not used with model: itm: %s; remove it", c.why)
		}
	}
	var rf map[string]*yaml.Node
	if r := f["require"]; r != nil {
		rf, _ = p.fields(r, "require", "margin", "reliability", "sigma") // checked by require
		if v := rf["sigma"]; v != nil {
			return p.errf(v, "require.sigma", "not used with model: itm: the ITM gives the location variability itself, and require.reliability becomes its reliability; remove sigma")
		}
	}
	m.Polarization = pl.Polarization
	if n != nil {
		sf, err := p.fields(n, "itm", itmKeys...)
		if err != nil {
			return err
		}
		text, err := p.texts(sf, "itm")
		if err != nil {
			return err
		}
		o := ITMOptions{Climate: text[ITMOptClimate], Refractivity: text[ITMOptRefractivity], SurfaceRefractivity: text[ITMOptSurfaceRefractivity],
			Permittivity: text[ITMOptPermittivity], Conductivity: text[ITMOptConductivity], Variability: text[ITMOptVariability],
			Time: text[ITMOptTime], Location: text[ITMOptLocation], Situation: text[ITMOptSituation], Confidence: text[ITMOptConfidence]}
		for _, sw := range []struct {
			key string
			dst *bool
		}{{"location_variability", &o.NoLocationVariability}, {"situation_variability", &o.NoSituationVariability}} {
			if v := sf[sw.key]; v != nil {
				c, err := p.choice(v, "itm."+sw.key, "yes", "no", "true", "false")
				if err != nil {
					return err
				}
				*sw.dst = c == "no" || c == "false"
			}
		}
		if err := p.options(n, "itm", sf, o.Apply(&m)); err != nil {
			return err
		}
	}
	model, err := ITMRequirement(m, &pl.Require)
	if err != nil {
		at := f["require"]
		if v := rf["reliability"]; v != nil {
			at = v
		}
		return p.wrap(at, "require.reliability", errors.Unwrap(err))
	}
	pl.Model = model
	return nil
}

// texts returns the scalar text of every value in f, by key.
func (p *planParser) texts(f map[string]*yaml.Node, field string) (map[string]string, error) {
	text := make(map[string]string, len(f))
	for _, key := range slices.Sorted(maps.Keys(f)) { // the same error first every time
		s, err := p.scalar(f[key], joinField(field, key))
		if err != nil {
			return nil, err
		}
		text[key] = s
	}
	return text, nil
}

// options turns an error of a group of options parsed together
// (units.OptionError) into a *PlanError at the option's own line.
func (p *planParser) options(n *yaml.Node, field string, f map[string]*yaml.Node, err error) error {
	if err == nil {
		return nil
	}
	var oe *units.OptionError
	if errors.As(err, &oe) {
		return p.wrap(orNode(f[oe.Option], n), joinField(field, oe.Option), oe.Err)
	}
	return p.wrap(n, field, err)
}

// kit is the radio, antenna and feedline an end uses.
type kit struct {
	radio   Radio
	antenna Antenna
	line    feedline.Line
}

func (p *planParser) defaults(n *yaml.Node, k *kit) error {
	f, err := p.fields(n, "defaults", "radio", "antenna", "feedline", OptBodyLoss, OptClutter)
	if err != nil {
		return err
	}
	return p.kit(f, "defaults", k)
}

func (p *planParser) kit(f map[string]*yaml.Node, field string, k *kit) error {
	if c := f["radio"]; c != nil {
		rf, err := p.fields(c, joinField(field, "radio"), "power", "sensitivity")
		if err != nil {
			return err
		}
		if v := rf["power"]; v != nil {
			if k.radio.PowerW, err = p.quantity(v, joinField(field, "radio.power"), units.ParsePowerW); err != nil {
				return err
			}
		}
		if v := rf["sensitivity"]; v != nil {
			if k.radio.SensitivityDBm, err = p.quantity(v, joinField(field, "radio.sensitivity"), units.ParseSensitivityDBm); err != nil {
				return err
			}
		}
	}
	if c := f["antenna"]; c != nil {
		af := fieldsOf(c)
		if c.Kind == yaml.MappingNode {
			var err error
			if af, err = p.fields(c, joinField(field, "antenna"), OptAntennaType, OptBearing, OptGain, OptHeight); err != nil {
				return err
			}
		}
		text, err := p.texts(af, joinField(field, "antenna"))
		if err != nil {
			return err
		}
		o := AntennaOptions{Type: text[OptAntennaType], Bearing: text[OptBearing], Gain: text[OptGain], Height: text[OptHeight]}
		if err := p.options(c, joinField(field, "antenna"), af, o.Apply(&k.antenna)); err != nil {
			return err
		}
	}
	// body_loss and clutter belong to the end, not to its antenna mapping.
	ef := map[string]*yaml.Node{}
	for _, key := range []string{OptBodyLoss, OptClutter} {
		if v := f[key]; v != nil {
			ef[key] = v
		}
	}
	if len(ef) > 0 {
		text, err := p.texts(ef, field)
		if err != nil {
			return err
		}
		o := AntennaOptions{BodyLoss: text[OptBodyLoss], Clutter: text[OptClutter]}
		if err := p.options(nil, field, ef, o.Apply(&k.antenna)); err != nil {
			return err
		}
	}
	if c := f["feedline"]; c != nil {
		ff, err := p.fields(c, joinField(field, "feedline"), "cable", "length", "connectors", "swr")
		if err != nil {
			return err
		}
		if v := ff["cable"]; v != nil {
			name, err := p.scalar(v, joinField(field, "feedline.cable"))
			if err != nil {
				return err
			}
			c, err := feedline.ResolveCable(name)
			if err != nil {
				return p.wrap(v, joinField(field, "feedline.cable"), err)
			}
			k.line.Cable = c
			if k.line.ConnectorLossDB == 0 {
				k.line.ConnectorLossDB = feedline.DefaultConnectorLossDB
			}
		}
		if v := ff["length"]; v != nil {
			if k.line.LengthM, err = p.quantity(v, joinField(field, "feedline.length"), units.ParseLengthM); err != nil {
				return err
			}
		}
		if v := ff["connectors"]; v != nil {
			s, err := p.scalar(v, joinField(field, "feedline.connectors"))
			if err != nil {
				return err
			}
			c, e := strconv.Atoi(s)
			if e != nil || c < 0 || c > 20 {
				return p.errf(v, joinField(field, "feedline.connectors"), "%q is not a number of connector pairs from 0 to 20", s)
			}
			k.line.Connectors = c
		}
		if v := ff["swr"]; v != nil {
			if k.line.SWR, err = p.quantity(v, joinField(field, "feedline.swr"), units.ParseSWR); err != nil {
				return err
			}
		}
	}
	return nil
}

// fieldsOf is the short form of antenna: a catalog name alone
// ("antenna: yagi-3el-2m"), as the mapping {type: …} would give it.
func fieldsOf(n *yaml.Node) map[string]*yaml.Node {
	return map[string]*yaml.Node{OptAntennaType: n}
}

// position resolves "at": a waypoint name or LAT,LON.
func (p *planParser) position(n *yaml.Node, field string) (orb.Point, error) {
	s, err := p.scalar(n, field)
	if err != nil {
		return orb.Point{}, err
	}
	pt, perr := units.ParsePoint(s)
	if perr == nil {
		return pt, nil
	}
	if !errors.Is(perr, units.ErrSyntax) {
		return orb.Point{}, p.wrap(n, field, perr)
	}
	if p.plan.Waypoints == nil {
		return orb.Point{}, p.errf(n, field, "%q is neither LAT,LON nor a waypoint (the plan names no waypoints file; add `waypoints: FILE.gpx`)", s)
	}
	w, err := p.plan.Waypoints.Lookup(s)
	if err != nil {
		return orb.Point{}, p.wrap(n, field, err)
	}
	return w.Pos, nil
}

func (p *planParser) station(n *yaml.Node, field string, def kit) (Station, error) {
	f, err := p.fields(n, field, "name", "at", "radio", "antenna", "feedline", OptBodyLoss, OptClutter, "exposure", "coverage")
	if err != nil {
		return Station{}, err
	}
	st := Station{}
	if err := p.end(n, f, field, def, &st.End, true); err != nil {
		return Station{}, err
	}
	st.Exposure = exposure.Input{Mode: exposure.ModeFM, TxFraction: 0.5, Standard: exposure.StandardFCC, HeadHeightM: exposure.DefaultHeadHeightM, ReflectionFactor: exposure.ReflectionGround}
	if c := f["exposure"]; c != nil {
		if err := p.exposure(c, joinField(field, "exposure"), &st.Exposure); err != nil {
			return Station{}, err
		}
	}
	if c := f["coverage"]; c != nil {
		cs, err := p.coverage(c, joinField(field, "coverage"))
		if err != nil {
			return Station{}, err
		}
		st.Coverage = cs
	}
	return st, nil
}

// coverage reads a station's coverage: the map to draw around it.
func (p *planParser) coverage(n *yaml.Node, field string) (*CoverageSpec, error) {
	f, err := p.fields(n, field, "radius", "mode", "value", "levels", "resolution")
	if err != nil {
		return nil, err
	}
	cs := &CoverageSpec{Line: n.Line}
	c := f["radius"]
	if c == nil {
		return nil, p.errf(n, joinField(field, "radius"), "missing: give the radius of the map (e.g. radius: 10km)")
	}
	if cs.RadiusM, err = p.quantity(c, joinField(field, "radius"), units.ParseLengthM); err != nil {
		return nil, err
	}
	if !(cs.RadiusM > 0) {
		return nil, p.errf(c, joinField(field, "radius"), "give a radius above 0 m")
	}
	if c := f["mode"]; c != nil {
		s, err := p.scalar(c, joinField(field, "mode"))
		if err != nil {
			return nil, err
		}
		if cs.Mode, err = ParseCoverageMode(s); err != nil {
			return nil, p.wrap(c, joinField(field, "mode"), err)
		}
	}
	if c := f["value"]; c != nil {
		s, err := p.scalar(c, joinField(field, "value"))
		if err != nil {
			return nil, err
		}
		if cs.Value, err = ParseCoverageValue(s); err != nil {
			return nil, p.wrap(c, joinField(field, "value"), err)
		}
		if cs.Mode == CoverageLOS {
			return nil, p.errf(c, joinField(field, "value"), "a line-of-sight map holds visible or hidden; drop value or use mode: loss")
		}
		cs.HasValue = true
	}
	if c := f["levels"]; c != nil {
		var text string
		switch c.Kind {
		case yaml.SequenceNode:
			parts := make([]string, len(c.Content))
			for i, e := range c.Content {
				if parts[i], err = p.scalar(e, fmt.Sprintf("%s.levels[%d]", field, i)); err != nil {
					return nil, err
				}
			}
			text = strings.Join(parts, ",")
		default:
			if text, err = p.scalar(c, joinField(field, "levels")); err != nil {
				return nil, err
			}
		}
		if cs.Levels, err = ParseCoverageLevels(text); err != nil {
			return nil, p.wrap(c, joinField(field, "levels"), err)
		}
	}
	if c := f["resolution"]; c != nil {
		if cs.ResolutionM, err = p.quantity(c, joinField(field, "resolution"), units.ParseLengthM); err != nil {
			return nil, err
		}
		if !(cs.ResolutionM > 0) {
			return nil, p.errf(c, joinField(field, "resolution"), "give a cell size above 0 m")
		}
	}
	return cs, nil
}

func (p *planParser) end(n *yaml.Node, f map[string]*yaml.Node, field string, def kit, e *End, needRadio bool) error {
	nameNode := f["name"]
	if nameNode == nil {
		return p.errf(n, joinField(field, "name"), "missing: every entry needs a name")
	}
	name, err := p.scalar(nameNode, joinField(field, "name"))
	if err != nil {
		return err
	}
	e.Name = name
	atNode := f["at"]
	if atNode == nil {
		atNode = nameNode // a waypoint of the same name
	}
	if e.Pos, err = p.position(atNode, joinField(field, "at")); err != nil {
		return err
	}
	k := def
	if err := p.kit(f, field, &k); err != nil {
		return err
	}
	if needRadio && (k.radio.PowerW == 0 || k.radio.SensitivityDBm == 0) {
		return p.errf(n, joinField(field, "radio"), "missing: give radio: {power: 5W, sensitivity: 0.25uV} here or under defaults")
	}
	e.Radio, e.Antenna, e.Feedline = k.radio, k.antenna, k.line
	if e.Feedline.Cable.Name != "" && e.Feedline.LengthM == 0 {
		return p.errf(orNode(f["feedline"], n), joinField(field, "feedline.length"), "missing: a cable needs a length (e.g. length: 15m)")
	}
	return nil
}

func (p *planParser) target(n *yaml.Node, field string, def kit) (Target, error) {
	f, err := p.fields(n, field, "name", "at", "radio", "antenna", "feedline", OptBodyLoss, OptClutter, "listen", "transmit", "frequency", "optional")
	if err != nil {
		return Target{}, err
	}
	t := Target{}
	if err := p.end(n, f, field, def, &t.End, true); err != nil {
		return Target{}, err
	}
	l, tx, fr := f["listen"], f["transmit"], f["frequency"]
	switch {
	case l != nil || tx != nil:
		if l == nil || tx == nil {
			return Target{}, p.errf(n, field, "a repeater needs both listen and transmit frequencies")
		}
		if fr != nil {
			return Target{}, p.errf(fr, joinField(field, "frequency"), "give either frequency (simplex) or listen and transmit (repeater), not both")
		}
		t.Kind = Repeater
		if t.ListenMHz, err = p.quantity(l, joinField(field, "listen"), units.ParseFreqMHz); err != nil {
			return Target{}, err
		}
		if t.TransmitMHz, err = p.quantity(tx, joinField(field, "transmit"), units.ParseFreqMHz); err != nil {
			return Target{}, err
		}
	case fr != nil:
		if t.FreqMHz, err = p.quantity(fr, joinField(field, "frequency"), units.ParseFreqMHz); err != nil {
			return Target{}, err
		}
	default:
		if p.plan.FreqMHz == 0 {
			return Target{}, p.errf(n, joinField(field, "frequency"), "missing: give frequency here or at the top of the plan")
		}
		t.FreqMHz = p.plan.FreqMHz
	}
	if c := f["optional"]; c != nil {
		s, err := p.choice(c, joinField(field, "optional"), "true", "false", "yes", "no")
		if err != nil {
			return Target{}, err
		}
		t.Optional = s == "true" || s == "yes"
	}
	return t, nil
}

// exposure reads a station's exposure: habits with exposure.Options, the
// parser the exposure command uses too.
func (p *planParser) exposure(n *yaml.Node, field string, e *exposure.Input) error {
	f, err := p.fields(n, field, exposure.OptionKeys...)
	if err != nil {
		return err
	}
	text, err := p.texts(f, field)
	if err != nil {
		return err
	}
	o := exposure.Options{Mode: text[exposure.OptMode], Duty: text[exposure.OptDuty], TxTime: text[exposure.OptTxTime],
		On: text[exposure.OptOn], Off: text[exposure.OptOff], Standard: text[exposure.OptStandard],
		HeadHeight: text[exposure.OptHeadHeight], Reflection: text[exposure.OptReflection]}
	return p.options(n, field, f, o.Apply(e))
}

func (p *planParser) mast(n *yaml.Node) (*MastSweep, error) {
	f, err := p.fields(n, "mast", "heights", "cables", "run", "slack", "antennas", "keepout_limit")
	if err != nil {
		return nil, err
	}
	m := &MastSweep{SlackM: 1}
	c := f["heights"]
	if c == nil {
		return nil, p.errf(n, "mast.heights", "missing: give the heights to try (e.g. heights: 2m..12m step 1m)")
	}
	s, err := p.scalar(c, "mast.heights")
	if err != nil {
		return nil, err
	}
	if m.Heights, err = units.ParseLengthRange(s); err != nil {
		return nil, p.wrap(c, "mast.heights", err)
	}
	c = f["cables"]
	if c == nil {
		return nil, p.errf(n, "mast.cables", "missing: list the cables to try (e.g. cables: [RG-58, RG-8X, RG-213])")
	}
	if c.Kind != yaml.SequenceNode || len(c.Content) == 0 {
		return nil, p.errf(c, "mast.cables", "expected a list of cable names, found %s", describe(c))
	}
	for i, cc := range c.Content {
		fld := fmt.Sprintf("mast.cables[%d]", i)
		name, err := p.scalar(cc, fld)
		if err != nil {
			return nil, err
		}
		c, err := feedline.ResolveCable(name)
		if err != nil {
			return nil, p.wrap(cc, fld, err)
		}
		m.Cables = append(m.Cables, c)
	}
	if c := f["antennas"]; c != nil {
		if c.Kind != yaml.SequenceNode || len(c.Content) == 0 {
			return nil, p.errf(c, "mast.antennas", "expected a list of catalog antennas (see `mastlink antenna --list`), found %s", describe(c))
		}
		for i, cc := range c.Content {
			fld := fmt.Sprintf("mast.antennas[%d]", i)
			name, err := p.scalar(cc, fld)
			if err != nil {
				return nil, err
			}
			a, err := antenna.Lookup(name)
			if err != nil {
				return nil, p.wrap(cc, fld, err)
			}
			m.Antennas = append(m.Antennas, a)
		}
	}
	if c := f["run"]; c != nil {
		if m.RunM, err = p.quantity(c, "mast.run", units.ParseLengthM); err != nil {
			return nil, err
		}
	}
	if c := f["slack"]; c != nil {
		if m.SlackM, err = p.quantity(c, "mast.slack", units.ParseLengthM); err != nil {
			return nil, err
		}
	}
	if c := f["keepout_limit"]; c != nil {
		if m.KeepoutLimitM, err = p.quantity(c, "mast.keepout_limit", units.ParseLengthM); err != nil {
			return nil, err
		}
		if !(m.KeepoutLimitM > 0) {
			return nil, p.errf(c, "mast.keepout_limit", "give the clear space around the mast foot as a length above 0 (e.g. keepout_limit: 3m)")
		}
	}
	return m, nil
}

// relay reads one entry of relays:. The parties are resolved by the relay
// search (they may be stations, targets or waypoints).
func (p *planParser) relay(n *yaml.Node, field string) (RelaySpec, error) {
	f, err := p.fields(n, field, "between", "and", "height", "radius", "frequency_a", "frequency_b")
	if err != nil {
		return RelaySpec{}, err
	}
	r := RelaySpec{Line: n.Line}
	for _, key := range []string{"between", "and"} {
		c := f[key]
		if c == nil {
			return RelaySpec{}, p.errf(n, joinField(field, key), "missing: name the two parties (between: A, and: B)")
		}
		s, err := p.scalar(c, joinField(field, key))
		if err != nil {
			return RelaySpec{}, err
		}
		if key == "between" {
			r.Between = s
		} else {
			r.And = s
		}
	}
	if c := f["height"]; c != nil {
		s, err := p.scalar(c, joinField(field, "height"))
		if err != nil {
			return RelaySpec{}, err
		}
		if r.HeightsM, err = ParseRelayHeights(s); err != nil {
			return RelaySpec{}, p.wrap(c, joinField(field, "height"), err)
		}
	}
	if c := f["radius"]; c != nil {
		if r.RadiusM, err = p.quantity(c, joinField(field, "radius"), units.ParseLengthM); err != nil {
			return RelaySpec{}, err
		}
	}
	if c := f["frequency_a"]; c != nil {
		if r.FreqAMHz, err = p.quantity(c, joinField(field, "frequency_a"), units.ParseFreqMHz); err != nil {
			return RelaySpec{}, err
		}
	}
	if c := f["frequency_b"]; c != nil {
		if r.FreqBMHz, err = p.quantity(c, joinField(field, "frequency_b"), units.ParseFreqMHz); err != nil {
			return RelaySpec{}, err
		}
	}
	return r, nil
}

// ParseRelayHeights reads the relay antenna heights to try: one length
// ("6m") or a range ("2m..10m step 2m", units.ParseLengthRange), metres.
func ParseRelayHeights(s string) ([]float64, error) {
	if strings.Contains(s, "..") {
		r, err := units.ParseLengthRange(s)
		if err != nil {
			return nil, err
		}
		hs := r.ValuesM()
		if len(hs) > 255 {
			return nil, fmt.Errorf("%q gives %d heights; give at most 255", s, len(hs))
		}
		return hs, nil
	}
	h, err := units.ParseLengthM(s)
	if err != nil {
		return nil, err
	}
	return []float64{h}, nil
}
