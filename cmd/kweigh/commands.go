package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/urfave/cli/v3"
)

// writeShortUsage is what a bare `kweigh` prints (to stderr, exit 2): one
// line per registered command, from the commands themselves, so a command
// added later is listed without touching this file.
func writeShortUsage(w io.Writer, root *cli.Command) {
	fmt.Fprintln(w, "usage: kweigh COMMAND [options] ARGUMENTS...")
	fmt.Fprintln(w)
	width := 0
	for _, c := range root.Commands {
		if !c.Hidden {
			width = max(width, len(c.Name))
		}
	}
	for _, c := range root.Commands {
		if !c.Hidden {
			fmt.Fprintf(w, "  %-*s  %s\n", width, c.Name, c.Usage)
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Example: kweigh check --spec ebu-r128 deliveries/   (kweigh help COMMAND for a command's options)")
}

// rootAction runs when no subcommand matched: no arguments at all is a
// usage mistake with the short usage; an unknown word gets a suggestion.
func rootAction(stderr io.Writer) cli.ActionFunc {
	return func(_ context.Context, cmd *cli.Command) error {
		if cmd.Args().Len() == 0 {
			writeShortUsage(stderr, cmd)
			return quietUsage{}
		}
		return unknownCommand(cmd, cmd.Args().First())
	}
}

// quietUsage is a usage mistake whose explanation is already printed.
type quietUsage struct{}

func (quietUsage) Error() string    { return "usage" }
func (quietUsage) alreadyReported() {}

// unknownCommand is the error for a word that is no command, with the
// nearest command name when one is close.
func unknownCommand(root *cli.Command, word string) error {
	var names []string
	for _, c := range root.Commands {
		if !c.Hidden {
			names = append(names, c.Name)
		}
	}
	best, bestDist := "", 3 // at most two edits away
	for _, n := range names {
		if d := editDistance(strings.ToLower(word), n); d < bestDist {
			best, bestDist = n, d
		}
	}
	if best != "" {
		return usagef("unknown command '%s'; did you mean '%s'? (see 'kweigh help')", word, best)
	}
	return usagef("unknown command '%s'; commands: %s (see 'kweigh help')", word, strings.Join(names, ", "))
}

// unknownHelpTopic recognises the command-line library's error for `kweigh
// help WORD` with an unknown WORD, so that it gets the same message and
// suggestion as `kweigh WORD`.
func unknownHelpTopic(err error) (string, bool) {
	const prefix = "No help topic for '"
	if err == nil || !strings.HasPrefix(err.Error(), prefix) || !strings.HasSuffix(err.Error(), "'") {
		return "", false
	}
	return strings.TrimSuffix(strings.TrimPrefix(err.Error(), prefix), "'"), true
}

// editDistance is the Levenshtein distance between a and b, by runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// configureCompletion makes the completion command visible and says what
// it is for in kweigh's words.
func configureCompletion(c *cli.Command) {
	c.Hidden = false
	c.Usage = "print a shell completion script: kweigh completion bash|zsh|fish"
	c.Description = "Prints a script that completes kweigh's commands and options in your shell.\n\n" +
		"   bash:  source <(kweigh completion bash)          (add to ~/.bashrc)\n" +
		"   zsh:   source <(kweigh completion zsh)           (add to ~/.zshrc)\n" +
		"   fish:  kweigh completion fish > ~/.config/fish/completions/kweigh.fish"
}
