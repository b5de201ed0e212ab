package decode

// Bext is the Broadcast Wave Format extension chunk (EBU Tech 3285). The
// loudness fields exist from version 2 (EBU Tech 3285 v2, 2011); each is nil
// when the version is older or the field holds the "not set" value 0x7FFF.
type Bext struct {
	Description          string   `json:"description"`
	Originator           string   `json:"originator"`
	OriginatorReference  string   `json:"originator_reference"`
	OriginationDate      string   `json:"origination_date"`
	OriginationTime      string   `json:"origination_time"`
	TimeReference        uint64   `json:"time_reference_samples"`
	Version              int      `json:"version"`
	LoudnessValue        *float64 `json:"loudness_value_lufs"`
	LoudnessRange        *float64 `json:"loudness_range_lu"`
	MaxTruePeakLevel     *float64 `json:"max_true_peak_level_dbtp"`
	MaxMomentaryLoudness *float64 `json:"max_momentary_loudness_lufs"`
	MaxShortTermLoudness *float64 `json:"max_short_term_loudness_lufs"`
	CodingHistory        string   `json:"coding_history"`
}
