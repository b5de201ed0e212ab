package rules

import (
	"errors"
	"fmt"
	"io"
	"slices"
	"sort"
	"strings"
	"unicode"

	"github.com/BurntSushi/toml"

	"github.com/kweigh/kweigh/decode"
)

// SpecFileName is the name of the per-folder spec file `kweigh check` looks
// for in a delivery folder.
const SpecFileName = "kweigh.toml"

// LoadFile reads (ReadSpecFile) and parses (Parse) the user spec at path.
func LoadFile(path string) (*Spec, error) {
	data, err := ReadSpecFile(path)
	if err != nil {
		return nil, err
	}
	return Parse(path, data)
}

// ReadSpecFile reads a spec file the one way kweigh reads them (the
// command line, the engine's folder search, the queue's jobs): only a
// regular file, and at most MaxSpecBytes of it. A FIFO, a device
// (/dev/zero) or a folder is refused at once, without blocking or reading;
// a larger file is refused without reading past the limit.
func ReadSpecFile(path string) ([]byte, error) {
	f, err := decode.OpenRegular(path)
	if err != nil {
		return nil, fmt.Errorf("spec %w", err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxSpecBytes+1))
	if err != nil {
		return nil, fmt.Errorf("spec %s: %w", path, err)
	}
	if len(data) > MaxSpecBytes {
		return nil, fmt.Errorf("spec %s: larger than %d KiB: not a spec file", path, MaxSpecBytes>>10)
	}
	return data, nil
}

// Parse reads a user spec in TOML. file names the source in errors and
// becomes Spec.File. The format:
//
//	name = "harbourlight-radio"          # spec ID in results; default: the file name
//	title = "Harbourlight Radio house spec"
//	description = "What the spec is for."
//	source = "Harbourlight Radio delivery requirements, issue 3 (2025)"
//	extends = "ebu-r128"                 # optional: start from a built-in spec
//	root = true                          # optional: folders above are not searched
//
//	[loudness]  target_lufs, tolerance_lu, mono_target_lufs,
//	            min_integrated_lufs, max_integrated_lufs, warn_margin_lu,
//	            max_true_peak_dbtp, max_short_term_lufs, max_momentary_lufs,
//	            min_lra_lu, max_lra_lu, lra_advisory
//	[format]    containers, sample_rates_hz, bit_depths, sample_formats,
//	            channels, layouts, min_bit_rate_kbps, max_bit_rate_kbps,
//	            bit_rate_modes
//	[timing]    min_duration_s, max_duration_s, max_leading_silence_s,
//	            max_trailing_silence_s
//	[signal]    max_clip_runs, max_dc_offset_dbfs, min_correlation,
//	            min_window_correlation, dual_mono, silent_channels
//	[bext]      required, loudness_tolerance_lu, true_peak_tolerance_db,
//	            lra_tolerance_lu, mismatch
//	[record]    job, client, operator, notes (the QC record's header)
//	[[group]]   name, channels ("1-6" or [7, 8]), stream (2 or "1-2"; then
//	            channels count within it), layout, spec, measure_only
//	            (one table per programme group; see SpecGroup)
//
// Every key overrides the same limit of the base spec. Setting target_lufs
// replaces an inherited min/max window and the other way round; a file may
// not set both. Unknown keys, values of the wrong type or out of range,
// unknown containers or layout labels, an unknown base and min > max are
// errors: a SpecErrors listing each problem with file, line and key. So are
// a file that sets no limit and extends nothing (it would pass every file),
// one larger than MaxSpecBytes, and one whose inline tables, arrays or
// dotted keys nest deeper than any spec needs (checked before the TOML
// library parses it, whose cost grows steeply with such nesting).
func Parse(file string, data []byte) (*Spec, error) {
	if line, problem := checkSpecShape(data); problem != "" {
		return nil, SpecErrors{{File: file, Line: line, Problem: problem}}
	}
	var raw map[string]any
	if _, err := toml.Decode(string(data), &raw); err != nil {
		return nil, SpecErrors{syntaxError(file, err)}
	}
	p := &specParser{file: file, lines: keyLines(data), set: map[string]int{}}
	spec := p.base(raw)
	p.header(spec, raw)
	for _, key := range sortedKeys(raw) {
		switch key {
		case "name", "title", "description", "source", "extends", "root":
			continue
		case "group":
			p.parseGroups(spec, raw[key])
			continue
		case "record":
			p.parseRecord(spec, raw[key])
			continue
		}
		keys, ok := specTables[key]
		table, isTable := raw[key].(map[string]any)
		switch {
		case !ok:
			p.unknown(key, "", raw[key])
			continue
		case !isTable:
			p.fail(key, "must be a table: write [%s] on a line of its own and its keys below it", key)
			continue
		}
		for _, name := range sortedKeys(table) {
			p.apply(spec, key, name, table[name], keys)
		}
	}
	p.crossCheck(spec)
	p.integratedSource(spec)
	if _, extends := raw["extends"]; !extends && len(p.set) == 0 && len(p.errs) == 0 {
		p.errs = append(p.errs, &SpecError{File: file, Problem: "the spec sets no limits and extends no built-in spec, so every file would pass: " +
			`add extends = "ebu-r128" (or another built-in) or a [loudness] table`})
	}
	if len(p.errs) > 0 {
		sort.SliceStable(p.errs, func(i, j int) bool { return p.errs[i].Line < p.errs[j].Line })
		return nil, p.errs
	}
	return spec, nil
}

// specParser collects the problems of one file.
type specParser struct {
	file      string
	lines     map[string]int
	errs      SpecErrors
	set       map[string]int    // dotted keys this file set, with their lines
	source    string            // what LimitSources says for limits this file sets
	lineSets  map[string][]int  // per check, the lines of this file that set it
	inherited map[string]string // per check, the base's source before this file
	// parent is the ID of the built-in this file extends, parentSource its
	// document and marker; empty when it extends none.
	parent, parentSource string
}

func (p *specParser) fail(key, format string, args ...any) {
	p.errs = append(p.errs, &SpecError{File: p.file, Line: lineOf(p.lines, key), Key: key, Problem: fmt.Sprintf(format, args...)})
}

// syntaxError turns a TOML library error into a SpecError with its line.
func syntaxError(file string, err error) *SpecError {
	var pe toml.ParseError
	if errors.As(err, &pe) {
		return &SpecError{File: file, Line: pe.Position.Line, Key: pe.LastKey, Problem: "TOML syntax: " + pe.Message}
	}
	return &SpecError{File: file, Problem: err.Error()}
}

// base returns the spec to start from: a copy of the built-in named by
// extends, or an empty spec with kweigh's defaults.
func (p *specParser) base(raw map[string]any) *Spec {
	v, ok := raw["extends"]
	if !ok {
		return newSpec()
	}
	id, isString := v.(string)
	if !isString {
		p.fail("extends", "must be the ID of a built-in spec (a string), got %s", describeValue(v))
		return newSpec()
	}
	s, err := Lookup(id)
	if err != nil {
		p.fail("extends", "%v", err)
		return newSpec()
	}
	s.Extends = s.ID
	p.parent = s.ID
	p.parentSource = s.Source.String()
	if s.Source.Marker != "" {
		p.parentSource += " [" + s.Source.Marker + "]"
	}
	// The parent's description speaks of the parent's numbers: a spec that
	// extends it says its own (Describe generates one from the effective
	// limits when the file gives none), and the parent's notes are marked
	// as the parent's.
	s.Description = ""
	for i, n := range s.Notes {
		s.Notes[i] = fmt.Sprintf("From %s: %s", s.ID, n)
	}
	s.Notes = append(s.Notes, fmt.Sprintf("Extends %s: %s.", s.ID, s.Title))
	return s
}

// header applies the top-level descriptive keys.
func (p *specParser) header(s *Spec, raw map[string]any) {
	text := func(key string) (string, bool) {
		v, ok := raw[key]
		if !ok {
			return "", false
		}
		str, isString := v.(string)
		if !isString {
			p.fail(key, "must be a string, got %s", describeValue(v))
			return "", false
		}
		return str, true
	}
	s.File = p.file
	s.ID = p.file
	if name, ok := text("name"); ok {
		if name == "" || strings.IndexFunc(name, func(r rune) bool { return unicode.IsSpace(r) || !unicode.IsPrint(r) }) >= 0 {
			p.fail("name", "must be one word without spaces, such as \"harbourlight-radio\", got %q", name)
		} else {
			s.ID = name
		}
	}
	if title, ok := text("title"); ok {
		s.Title = title
	} else if s.Extends != "" {
		s.Title = fmt.Sprintf("%s, extended by %s", s.Title, p.file)
	} else {
		s.Title = "user spec " + p.file
	}
	if d, ok := text("description"); ok {
		s.Description = d
	}
	doc := "user spec " + p.file
	if src, ok := text("source"); ok && src != "" {
		doc = src
	}
	s.Source = Source{Document: doc, Marker: "user spec"}
	p.source = doc
	if v, ok := raw["root"]; ok {
		if b, isBool := v.(bool); isBool {
			s.Root = b
		} else {
			p.fail("root", "must be true or false, got %s", describeValue(v))
		}
	}
}

// apply sets one key of a table.
func (p *specParser) apply(s *Spec, table, name string, raw any, keys []specKey) {
	dotted := table + "." + name
	for _, k := range keys {
		if k.name != name {
			continue
		}
		v, problem := convert(raw, k.kind)
		if problem == "" {
			problem = k.apply(s, v)
		}
		if problem != "" {
			p.fail(dotted, "%s", problem)
			return
		}
		line := lineOf(p.lines, dotted)
		p.set[dotted] = line
		p.noteSource(s, k.check, line)
		return
	}
	p.unknown(table, name, raw)
}

// noteSource records that this file sets (part of) the limit of check, at
// line. A limit made of several keys (the integrated target and tolerance)
// that the file only partly overrides keeps the inherited source after the
// file's own.
func (p *specParser) noteSource(s *Spec, check string, line int) {
	if p.lineSets == nil {
		p.lineSets, p.inherited = map[string][]int{}, map[string]string{}
	}
	if _, seen := p.lineSets[check]; !seen {
		p.inherited[check] = s.LimitSources[check]
	}
	p.lineSets[check] = append(p.lineSets[check], line)
	slices.Sort(p.lineSets[check])
	where := make([]string, len(p.lineSets[check]))
	for i, n := range p.lineSets[check] {
		where[i] = fmt.Sprintf("line %d", n)
	}
	text := fmt.Sprintf("%s (%s %s)", p.source, p.file, strings.Join(where, ", "))
	if base := p.inherited[check]; base != "" && keysPerCheck[check] > 1 {
		text += "; otherwise " + base
	}
	s.LimitSources[check] = text
}

// keysPerCheck counts the spec keys that set each check's limit.
var keysPerCheck = func() map[string]int {
	n := map[string]int{}
	for _, keys := range specTables {
		for _, k := range keys {
			n[k.check]++
		}
	}
	return n
}()

// unknown reports a key or table the format does not have, suggesting the
// nearest known name.
func (p *specParser) unknown(table, name string, raw any) {
	if name == "" {
		known := append([]string{"name", "title", "description", "source", "extends", "root"}, specTableOrder...)
		if _, isTable := raw.(map[string]any); isTable {
			p.fail(table, "unknown table%s (known tables: %s)", suggest(table, specTableOrder), strings.Join(specTableOrder, ", "))
		} else {
			p.fail(table, "unknown key%s (top-level keys: name, title, description, source, extends; limits go in the tables %s)",
				suggest(table, known), strings.Join(specTableOrder, ", "))
		}
		return
	}
	names := make([]string, len(specTables[table]))
	for i, k := range specTables[table] {
		names[i] = k.name
	}
	p.fail(table+"."+name, "unknown key%s (known in [%s]: %s)", suggest(name, names), table, strings.Join(names, ", "))
}

// crossCheck applies the rules that involve several keys, after all keys
// are set.
func (p *specParser) crossCheck(s *Spec) {
	l := &s.Loudness
	_, target := p.set["loudness.target_lufs"]
	_, minI := p.set["loudness.min_integrated_lufs"]
	_, maxI := p.set["loudness.max_integrated_lufs"]
	switch {
	case target && (minI || maxI):
		key := "loudness.min_integrated_lufs"
		if maxI {
			key = "loudness.max_integrated_lufs"
		}
		p.fail(key, "give either target_lufs with tolerance_lu or a min/max window, not both")
	case target:
		l.MinIntegratedLUFS, l.MaxIntegratedLUFS = nil, nil
	case minI || maxI:
		// A window replaces an inherited target and what hangs on it; an
		// inherited window keeps the bound this file does not set.
		l.TargetLUFS, l.MonoTargetLUFS, l.MonoOffsetLU, l.ToleranceLU = nil, nil, nil, 0
	}
	_, mono := p.set["loudness.mono_target_lufs"]
	switch {
	case mono:
		l.MonoOffsetLU = nil // set on its own: no longer relative
	case target && l.MonoOffsetLU != nil && l.MonoTargetLUFS != nil && l.TargetLUFS != nil:
		// A mono target the base defines relative to the stereo one
		// follows the new stereo target.
		l.MonoTargetLUFS = ptr(*l.TargetLUFS + *l.MonoOffsetLU)
	}
	if _, ok := p.set["loudness.tolerance_lu"]; ok && l.TargetLUFS == nil && !(target && (minI || maxI)) {
		p.fail("loudness.tolerance_lu", "needs target_lufs (this spec judges integrated loudness by a min/max window)")
	}
	if _, ok := p.set["loudness.mono_target_lufs"]; ok && l.TargetLUFS == nil && !(target && (minI || maxI)) {
		p.fail("loudness.mono_target_lufs", "needs target_lufs: the mono target replaces it for one-channel files")
	}
	p.ordered("loudness.min_integrated_lufs", l.MinIntegratedLUFS, "loudness.max_integrated_lufs", l.MaxIntegratedLUFS)
	p.ordered("loudness.min_lra_lu", l.MinLRALU, "loudness.max_lra_lu", l.MaxLRALU)
	p.ordered("timing.min_duration_s", s.Timing.MinDurationS, "timing.max_duration_s", s.Timing.MaxDurationS)
	p.ordered("format.min_bit_rate_kbps", s.Format.MinBitRateKbps, "format.max_bit_rate_kbps", s.Format.MaxBitRateKbps)
}

// integratedSource writes where each value of the integrated requirement
// comes from, value by value, when this file sets any of them: the file
// and line for values it sets, the base spec's document for values it
// inherits, and for a mono target that follows the stereo one, the offset.
// Inherited values name the base's document, not its own wording, which
// speaks of the base's numbers.
func (p *specParser) integratedSource(s *Spec) {
	keys := []string{"target_lufs", "tolerance_lu", "mono_target_lufs", "min_integrated_lufs", "max_integrated_lufs"}
	touched := false
	for _, k := range keys {
		if _, ok := p.set["loudness."+k]; ok {
			touched = true
		}
	}
	if !touched {
		return
	}
	from := func(key string) string {
		if line, ok := p.set["loudness."+key]; ok {
			return fmt.Sprintf("%s (%s line %d)", p.source, p.file, line)
		}
		if p.parent != "" {
			return fmt.Sprintf("inherited from %s, %s", p.parent, p.parentSource)
		}
		return "kweigh default"
	}
	l, u := s.Loudness, s.Unit()
	var parts []string
	if l.TargetLUFS != nil {
		parts = append(parts, fmt.Sprintf("target %s %s: %s", limitNum(*l.TargetLUFS), u, from("target_lufs")),
			fmt.Sprintf("tolerance ±%s LU: %s", magnitude(l.ToleranceLU), from("tolerance_lu")))
		if m := l.MonoTargetLUFS; m != nil {
			_, set := p.set["loudness.mono_target_lufs"]
			_, moved := p.set["loudness.target_lufs"]
			if !set && moved && l.MonoOffsetLU != nil {
				parts = append(parts, fmt.Sprintf("mono target %s %s: %s LU below the target, as %s defines it", limitNum(*m), u, magnitude(-*l.MonoOffsetLU), p.parent))
			} else {
				parts = append(parts, fmt.Sprintf("mono target %s %s: %s", limitNum(*m), u, from("mono_target_lufs")))
			}
		}
	}
	if v := l.MinIntegratedLUFS; v != nil {
		parts = append(parts, fmt.Sprintf("minimum %s %s: %s", limitNum(*v), u, from("min_integrated_lufs")))
	}
	if v := l.MaxIntegratedLUFS; v != nil {
		parts = append(parts, fmt.Sprintf("maximum %s %s: %s", limitNum(*v), u, from("max_integrated_lufs")))
	}
	s.LimitSources["integrated"] = strings.Join(parts, "; ")
}

// ordered reports min > max, at whichever of the two keys this file set
// last.
func (p *specParser) ordered(minKey string, lo *float64, maxKey string, hi *float64) {
	if lo == nil || hi == nil || *lo <= *hi {
		return
	}
	_, setMin := p.set[minKey]
	_, setMax := p.set[maxKey]
	if !setMin && !setMax {
		return
	}
	key := maxKey
	if setMin && (!setMax || p.set[minKey] > p.set[maxKey]) {
		key = minKey
	}
	p.fail(key, "minimum %s is above maximum %s", fmtValue(*lo), fmtValue(*hi))
}

func sortedKeys(m map[string]any) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// suggest returns ` "x" (did you mean "y"?)` for the closest known name
// within a small edit distance, or ` "x"` alone.
func suggest(name string, known []string) string {
	best, bestDist := "", 4
	for _, k := range known {
		if d := editDistance(name, k); d < bestDist {
			best, bestDist = k, d
		}
	}
	if best == "" {
		return fmt.Sprintf(" %q", name)
	}
	return fmt.Sprintf(" %q (did you mean %q?)", name, best)
}

// editDistance is the Levenshtein distance between a and b.
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
