package decode

// IXML holds the fields kweigh reads from an iXML chunk (the production
// recorders' metadata chunk in WAVE files; iXML specification, from
// memory): the timecode rate and drop-frame flag that go with the bext
// TimeReference. Empty strings mean the chunk does not say.
type IXML struct {
	// TimecodeRate is TIMECODE_RATE as written, e.g. "25/1" or
	// "30000/1001".
	TimecodeRate string `json:"timecode_rate,omitempty"`
	// TimecodeFlag is TIMECODE_FLAG as written: "DF" or "NDF".
	TimecodeFlag string `json:"timecode_flag,omitempty"`
}
