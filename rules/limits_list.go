package rules

// Limit is one line of a spec as `kweigh specs show` lists it: the check,
// the limit in words and numbers, and where the limit comes from with its
// marker.
type Limit struct {
	Check  string `json:"check"`
	Limit  string `json:"limit"`
	Source string `json:"source"`
}

// Limits lists every limit the spec sets, and the QC defaults it leaves in
// place, in check order: the rows of Describe, for machine output.
func (s *Spec) Limits() []Limit {
	rows := s.limitRows()
	out := make([]Limit, len(rows))
	for i, r := range rows {
		out[i] = Limit{Check: r.check, Limit: r.limit, Source: r.source}
	}
	return out
}
