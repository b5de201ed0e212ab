package main

import (
	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
	"github.com/kweigh/kweigh/timecode"
)

// qcOptions are the broadcast-QC options measure and check share:
// timecode, programme groups, the marker list and the QC record's fields.
type qcOptions struct {
	startTimecode string
	fps           *timecode.Rate
	groups        []measure.Group
	each          bool
	markers       string // --markers CSV file
	record        rules.RecordFields
	paper         string // a4 or letter
}

func qcFlags() []cli.Flag {
	return []cli.Flag{
		&cli.StringFlag{Name: "start-timecode", Usage: "timecode of each file's first sample, `HH:MM:SS:FF` (default: the file's bext time reference; without one, times count from zero)"},
		&cli.StringFlag{Name: "fps", Usage: "timecode frame `RATE`: 23.976, 24, 25, 29.97df, 29.97, 30, 50, 59.94df, 59.94, 60 (default: the file's iXML, else 25)"},
		&cli.StringFlag{Name: "groups", Usage: "programme groups in each file, measured and judged on their own: `SPEC` like 'main=1-6:5.1,stereo=7-8:stereo', by audio stream 'main=s1:5.1,stereo=s2:stereo' ('s2/1-2': channels within stream 2), or 'each' for every channel alone"},
		&cli.StringFlag{Name: "markers", Usage: "also write every event (where a limit breaks) as a CSV marker list to `FILE`"},
		&cli.StringFlag{Name: "job", Usage: "job reference for the QC record (HTML report header)"},
		&cli.StringFlag{Name: "client", Usage: "client for the QC record"},
		&cli.StringFlag{Name: "operator", Usage: "QC operator for the QC record"},
		&cli.StringFlag{Name: "notes", Usage: "notes for the QC record"},
		&cli.StringFlag{Name: "paper", Value: "a4", Usage: "paper size of the printed HTML report: a4 or letter"},
	}
}

func readQCOptions(cmd *cli.Command) (qcOptions, error) {
	q := qcOptions{
		startTimecode: cmd.String("start-timecode"),
		markers:       cmd.String("markers"),
		record:        rules.RecordFields{Job: cmd.String("job"), Client: cmd.String("client"), Operator: cmd.String("operator"), Notes: cmd.String("notes")},
		paper:         cmd.String("paper"),
	}
	if s := cmd.String("fps"); s != "" {
		r, err := timecode.ParseRate(s)
		if err != nil {
			return q, usagef("--fps: %v", err)
		}
		q.fps = &r
	}
	if q.startTimecode != "" {
		rate := timecode.Default
		if q.fps != nil {
			rate = *q.fps
		}
		if _, err := timecode.Parse(q.startTimecode, rate); err != nil {
			return q, usagef("--start-timecode: %v", err)
		}
	}
	if s := cmd.String("groups"); s != "" {
		var err error
		if q.groups, q.each, err = measure.ParseGroups(s); err != nil {
			return q, usageError{err}
		}
	}
	switch q.paper {
	case "a4", "letter":
	default:
		return q, usagef("--paper %q: use a4 or letter", q.paper)
	}
	return q, nil
}

// apply puts the QC options into the measurement's.
func (q qcOptions) apply(o measure.Options) measure.Options {
	o.StartTimecode, o.FPS = q.startTimecode, q.fps
	o.Groups, o.EachChannel = q.groups, q.each
	return o
}
