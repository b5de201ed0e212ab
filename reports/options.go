package reports

import "time"

// Options adjusts how a report is written. The zero value writes plain text
// without colour, stamps documents with the current time and leaves the
// version as "devel".
type Options struct {
	// Colour adds ANSI colour to verdicts in the text format. The CLI sets it
	// when stdout is a terminal; the verdict is always in words as well.
	Colour bool
	// Spec is the spec named on the command line. Documents record it; the
	// text format names a file's spec only where it differs (a per-folder
	// spec file).
	Spec string
	// Strict makes warnings count as failures where a format records pass
	// or fail itself (JUnit), matching the CLI's --strict exit status.
	Strict bool
	// Version is the kweigh version recorded in documents.
	Version string
	// Clock returns the time recorded in documents (JSON "generated", JUnit
	// timestamp); nil means time.Now. Tests pin it.
	Clock func() time.Time
}

func (o Options) now() time.Time {
	if o.Clock == nil {
		return time.Now()
	}
	return o.Clock()
}

func (o Options) version() string {
	if o.Version == "" {
		return "devel"
	}
	return o.Version
}

// generated is the document time: UTC, whole seconds, so the output does not
// depend on the machine's time zone.
func (o Options) generated() time.Time { return o.now().UTC().Truncate(time.Second) }
