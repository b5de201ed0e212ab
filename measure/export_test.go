package measure

// SectionsMeasured is the count of sections measured so far (split.go),
// for the external tests.
func SectionsMeasured() int64 { return sectionsMeasured.Load() }
