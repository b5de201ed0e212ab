package rules

// SpecDocument is the machine-readable form of one spec: what
// `kweigh specs show --format json` prints and what the upload gate answers
// for GET /v1/specs/{id}. One type for both, so the two cannot drift.
type SpecDocument struct {
	ID          string   `json:"id"`
	Title       string   `json:"title"`
	Description string   `json:"description"`
	Source      string   `json:"source"`
	Marker      string   `json:"marker"`
	Extends     string   `json:"extends,omitempty"`
	File        string   `json:"file,omitempty"`
	Root        bool     `json:"root,omitempty"`
	Limits      []Limit  `json:"limits"`
	Notes       []string `json:"notes"`
}

// Document returns the spec's SpecDocument. The description is the
// effective one (generated from the limits for a spec that extends another
// and sets none of its own); lists are never nil.
func (s *Spec) Document() SpecDocument {
	d := SpecDocument{
		ID: s.ID, Title: s.Title, Description: s.EffectiveDescription(), Source: s.Source.String(),
		Marker: s.Source.Marker, Extends: s.Extends, File: s.File, Root: s.Root,
		Limits: s.Limits(), Notes: append([]string{}, s.Notes...),
	}
	if d.Limits == nil {
		d.Limits = []Limit{}
	}
	return d
}

// SpecListing is one row of a list of specs (`kweigh specs --format json`,
// GET /v1/specs).
type SpecListing struct {
	ID      string `json:"id"`
	Title   string `json:"title"`
	Summary string `json:"summary"`
	Source  string `json:"source"`
	Marker  string `json:"marker"`
}

// Listing returns the spec's row in a list of specs.
func (s *Spec) Listing() SpecListing {
	return SpecListing{ID: s.ID, Title: s.Title, Summary: s.Summary(), Source: s.Source.String(), Marker: s.Source.Marker}
}
