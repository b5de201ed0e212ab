package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"text/tabwriter"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/rules"
)

func specsCommand() *cli.Command {
	return &cli.Command{
		Name:      "specs",
		Usage:     "list the built-in delivery specs, show one, or validate a spec file",
		ArgsUsage: " ",
		Description: "Built-in specs carry their source document, version and year. A value marked [memory]\n" +
			"was recalled rather than read in the document; check it against your copy.\n\n" +
			fmt.Sprintf(exitsHelpFmt, "done", "(not used)"),
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "format", Value: "text", Usage: "text or json"},
		},
		Action: func(ctx context.Context, cmd *cli.Command) error {
			if cmd.Args().Len() > 0 {
				return usagef("unknown specs subcommand %q (use: specs, specs show NAME, specs check FILE)", cmd.Args().First())
			}
			return runSpecsList(cmd.String("format"), cmd.Root().Writer)
		},
		Commands: []*cli.Command{
			{
				Name:      "show",
				Usage:     "print one spec (built-in id or TOML file) with every limit and its source",
				ArgsUsage: "NAME|FILE",
				Action: func(ctx context.Context, cmd *cli.Command) error {
					if cmd.Args().Len() != 1 {
						return usagef("specs show takes one spec name or file")
					}
					spec, err := loadSpec(cmd.Args().First())
					if err != nil {
						return err
					}
					return spec.Describe(cmd.Root().Writer)
				},
			},
			{
				Name:      "check",
				Usage:     "validate a user spec file (TOML); errors give file, line and key",
				ArgsUsage: "FILE...",
				Action: func(ctx context.Context, cmd *cli.Command) error {
					if cmd.Args().Len() == 0 {
						return usagef("specs check takes one or more spec files")
					}
					return runSpecsCheck(cmd.Args().Slice(), cmd.Root().Writer)
				},
			},
		},
	}
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
		type row struct {
			ID      string `json:"id"`
			Title   string `json:"title"`
			Summary string `json:"summary"`
			Source  string `json:"source"`
			Marker  string `json:"marker"`
		}
		rows := make([]row, 0, len(specs))
		for _, s := range specs {
			rows = append(rows, row{s.ID, s.Title, s.Summary(), s.Source.String(), s.Source.Marker})
		}
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(map[string]any{"specs": rows})
	}
	return usagef("--format %q: use text or json", format)
}

// runSpecsCheck validates spec files and reports each one.
func runSpecsCheck(paths []string, stdout io.Writer) error {
	bad := 0
	for _, p := range paths {
		s, err := rules.LoadFile(p)
		if err != nil {
			bad++
			fmt.Fprintf(stdout, "%v\n", err)
			continue
		}
		fmt.Fprintf(stdout, "%s: valid spec %q (%s)\n", p, s.ID, s.Summary())
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
