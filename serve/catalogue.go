package serve

import (
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/rules"
)

// Catalogue is the set of specs a server offers, by ID: the built-in specs,
// the specs of --specs DIR and the default spec. A client names a spec only
// by its ID; a path from a client is never opened.
type Catalogue struct {
	byID map[string]*rules.Spec
	ids  []string // built-ins first, then the others in ID order
	def  string
}

// NewCatalogue returns the catalogue of the built-in specs, extra and def
// (which may be one of the others). def is the spec used when a request
// names none. Two different specs with one ID are an error naming both.
func NewCatalogue(def *rules.Spec, extra ...*rules.Spec) (*Catalogue, error) {
	if def == nil {
		return nil, fmt.Errorf("no default spec")
	}
	c := &Catalogue{byID: map[string]*rules.Spec{}, def: def.ID}
	add := func(s *rules.Spec) error {
		if old, ok := c.byID[s.ID]; ok {
			if old == s || sameFile(old.File, s.File) {
				return nil
			}
			return fmt.Errorf("two specs with the id %q: %s and %s", s.ID, origin(old), origin(s))
		}
		c.byID[s.ID] = s
		c.ids = append(c.ids, s.ID)
		return nil
	}
	for _, s := range rules.Builtin() {
		if err := add(s); err != nil {
			return nil, err
		}
	}
	builtins := len(c.ids)
	for _, s := range extra {
		if err := add(s); err != nil {
			return nil, err
		}
	}
	if _, ok := c.byID[def.ID]; !ok || def.File != "" {
		if err := add(def); err != nil {
			return nil, err
		}
	}
	slices.Sort(c.ids[builtins:])
	return c, nil
}

// sameFile reports whether two spec file paths name one file (the default
// spec given by path may also sit in --specs DIR).
func sameFile(a, b string) bool {
	if a == "" || b == "" {
		return false
	}
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	return errA == nil && errB == nil && os.SameFile(sa, sb)
}

func origin(s *rules.Spec) string {
	if s.File != "" {
		return s.File
	}
	return "the built-in spec"
}

// Lookup returns the spec with the given ID; an empty id means the default.
func (c *Catalogue) Lookup(id string) (*rules.Spec, bool) {
	if id == "" {
		id = c.def
	}
	s, ok := c.byID[id]
	return s, ok
}

// Default returns the ID of the default spec.
func (c *Catalogue) Default() string { return c.def }

// Specs returns the specs on offer in a stable order: built-ins first.
func (c *Catalogue) Specs() []*rules.Spec {
	out := make([]*rules.Spec, len(c.ids))
	for i, id := range c.ids {
		out[i] = c.byID[id]
	}
	return out
}

// LoadSpecDir loads every *.toml file directly inside dir as a spec. A spec
// file without a name gets its file name (without .toml) as ID. Any file
// that does not parse is an error naming it: a server must not start with
// half its specs.
func LoadSpecDir(dir string) ([]*rules.Spec, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, fmt.Errorf("--specs: %w", err)
	}
	var specs []*rules.Spec
	for _, e := range entries {
		if e.IsDir() || !strings.EqualFold(filepath.Ext(e.Name()), ".toml") || strings.HasPrefix(e.Name(), ".") {
			continue
		}
		path := filepath.Join(dir, e.Name())
		s, err := engine.LoadSpec(path)
		if err != nil {
			return nil, fmt.Errorf("--specs: %w", err)
		}
		specs = append(specs, NamedSpec(s))
	}
	if len(specs) == 0 {
		return nil, fmt.Errorf("--specs %s: no *.toml spec file in it", dir)
	}
	return specs, nil
}

// NamedSpec gives a user spec without a name of its own (whose ID is then
// its path) the file name without .toml as ID, so a client can name it
// without knowing where the server keeps it.
func NamedSpec(s *rules.Spec) *rules.Spec {
	if s.File == "" || (s.ID != s.File && !strings.ContainsAny(s.ID, `/\`)) {
		return s
	}
	c := s.Clone()
	c.ID = strings.TrimSuffix(filepath.Base(s.File), filepath.Ext(s.File))
	return c
}
