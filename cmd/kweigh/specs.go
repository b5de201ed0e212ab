package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"text/tabwriter"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/rules"
)

// markerLegend explains the markers `specs show` puts after each source,
// in the words README.md uses.
const markerLegend = `Markers after a source say how kweigh knows the value:
  [doc]              read in the document itself
  [desc]             read in a neutral description of the document, not in the document itself
  [memory]           recalled, not yet read in the document: check it against your copy
  [common practice]  trade practice that no document sets ("common practice, no published source")
  [user spec]        set by the spec file named
`

const specsExitHelp = `EXIT STATUS:
   0  the specs were listed or shown, or every spec file checked is valid
   2  an unknown spec, an invalid spec file, or a mistake on the command line
`

func specsFormatFlag() cli.Flag {
	return &cli.StringFlag{Name: "format", Aliases: []string{"f"}, Value: "text", Usage: "text or json"}
}

func specsCommand() *cli.Command {
	return &cli.Command{
		Name:      "specs",
		Usage:     "list the built-in delivery specs, show one, or validate a spec file",
		ArgsUsage: " ",
		Description: "Built-in specs carry their source document, version and year, and every limit its source.\n\n" +
			markerLegend + "\n" + specsExitHelp,
		Flags: []cli.Flag{specsFormatFlag()},
		Action: func(ctx context.Context, cmd *cli.Command) error {
			if cmd.Args().Len() > 0 {
				return usagef("unknown specs subcommand %q (use: specs, specs show NAME, specs check FILE)", cmd.Args().First())
			}
			return runSpecsList(cmd.String("format"), cmd.Root().Writer)
		},
		Commands: []*cli.Command{
			{
				Name:        "show",
				Usage:       "print one spec (built-in id or TOML file) with every limit and its source",
				ArgsUsage:   "NAME|FILE",
				Description: "Prints the spec's title, source and every limit with where it comes from.\n\n" + markerLegend + "\n" + specsExitHelp,
				Flags:       []cli.Flag{specsFormatFlag()},
				Action: func(ctx context.Context, cmd *cli.Command) error {
					if cmd.Args().Len() != 1 {
						return usagef("specs show takes one spec name or file")
					}
					spec, err := loadSpec(cmd.Args().First())
					if err != nil {
						return err
					}
					return runSpecsShow(spec, specsFormat(cmd), cmd.Root().Writer)
				},
			},
			{
				Name:        "check",
				Usage:       "validate a user spec file (TOML); errors give file, line and key",
				ArgsUsage:   "FILE...",
				Description: "Reads each spec file as check would and reports every problem with file, line and key.\n\n" + specsExitHelp,
				Flags:       []cli.Flag{specsFormatFlag()},
				Action: func(ctx context.Context, cmd *cli.Command) error {
					if cmd.Args().Len() == 0 {
						return usagef("specs check takes one or more spec files")
					}
					return runSpecsCheck(cmd.Args().Slice(), specsFormat(cmd), cmd.Root().Writer)
				},
			},
		},
	}
}

// specsFormat is --format given to the subcommand or, before it, to specs.
func specsFormat(cmd *cli.Command) string {
	if cmd.IsSet("format") {
		return cmd.String("format")
	}
	for p := cmd.Lineage(); len(p) > 1; p = p[1:] {
		if p[1].IsSet("format") {
			return p[1].String("format")
		}
	}
	return "text"
}

func badSpecsFormat(format string) error { return usagef("--format %q: use text or json", format) }

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// runSpecsList prints the built-in specs, one line each.
func runSpecsList(format string, stdout io.Writer) error {
	specs := rules.Builtin()
	switch format {
	case "text":
		tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "SPEC\tTITLE\tMAIN LIMITS AND SOURCE")
		for _, s := range specs {
			fmt.Fprintf(tw, "%s\t%s\t%s\n", s.ID, s.Title, s.Summary())
		}
		if err := tw.Flush(); err != nil {
			return err
		}
		_, err := fmt.Fprintln(stdout, "\nShow one with: kweigh specs show NAME. A pass is not a broadcaster's or regulator's acceptance.")
		return err
	case "json":
		rows := make([]rules.SpecListing, 0, len(specs))
		for _, s := range specs {
			rows = append(rows, s.Listing())
		}
		return writeJSON(stdout, map[string]any{"specs": rows})
	}
	return badSpecsFormat(format)
}

// runSpecsShow prints one spec with every limit and its source.
func runSpecsShow(spec *rules.Spec, format string, stdout io.Writer) error {
	switch format {
	case "text":
		if err := spec.Describe(stdout); err != nil {
			return err
		}
		_, err := fmt.Fprint(stdout, "\n"+markerLegend)
		return err
	case "json":
		return writeJSON(stdout, spec.Document())
	}
	return badSpecsFormat(format)
}

// specProblemJSON is one problem of a spec file in `specs check --format json`.
type specProblemJSON struct {
	Line    int    `json:"line"`
	Key     string `json:"key"`
	Problem string `json:"problem"`
}

// runSpecsCheck validates spec files and reports each one.
func runSpecsCheck(paths []string, format string, stdout io.Writer) error {
	if format != "text" && format != "json" {
		return badSpecsFormat(format)
	}
	type fileJSON struct {
		Path     string            `json:"path"`
		Valid    bool              `json:"valid"`
		ID       string            `json:"id,omitempty"`
		Summary  string            `json:"summary,omitempty"`
		Problems []specProblemJSON `json:"problems"`
	}
	var files []fileJSON
	bad := 0
	for _, p := range paths {
		s, err := engine.LoadSpec(p)
		f := fileJSON{Path: p, Problems: []specProblemJSON{}}
		if err != nil {
			bad++
			var list rules.SpecErrors
			if errors.As(err, &list) {
				for _, e := range list {
					f.Problems = append(f.Problems, specProblemJSON{e.Line, e.Key, e.Problem})
				}
			} else {
				f.Problems = append(f.Problems, specProblemJSON{Problem: err.Error()})
			}
			if format == "text" {
				fmt.Fprintf(stdout, "%v\n", err)
			}
		} else {
			f.Valid, f.ID, f.Summary = true, s.ID, s.Summary()
			if format == "text" {
				fmt.Fprintf(stdout, "%s: valid spec %q (%s)\n", p, s.ID, s.Summary())
			}
		}
		files = append(files, f)
	}
	if format == "json" {
		if err := writeJSON(stdout, map[string]any{"files": files, "invalid": bad}); err != nil {
			return err
		}
	}
	if bad > 0 {
		return usageError{fmt.Errorf("%d spec file(s) invalid", bad)}
	}
	return nil
}

// loadSpec resolves a --spec value: a built-in id, or else a TOML file
// (regular files only: a FIFO is refused at once).
func loadSpec(name string) (*rules.Spec, error) {
	s, err := engine.LoadSpec(name)
	if err != nil {
		return nil, usageError{err}
	}
	return s, nil
}
