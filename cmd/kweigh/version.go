package main

import (
	"context"
	"fmt"
	"regexp"
	"runtime"
	"runtime/debug"
	"strings"

	"github.com/urfave/cli/v3"
)

// version may be set at build time with -ldflags "-X main.version=…"
// (release builds); otherwise versionString reads the build information Go
// records in every binary.
var version = ""

// versionString is the version recorded in outputs and printed by
// `kweigh version`: the -ldflags value when set; the module version when
// installed with `go install …@version`; for a local build the VCS revision
// and its time, with "modified" when the working tree had changes. It is
// never a bare "dev".
func versionString() string {
	if version != "" {
		return version
	}
	info, ok := debug.ReadBuildInfo()
	if !ok {
		return "unknown (built without module information)"
	}
	return versionFrom(info)
}

func versionFrom(info *debug.BuildInfo) string {
	var rev, at string
	modified := false
	for _, s := range info.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.time":
			at = s.Value
		case "vcs.modified":
			modified = s.Value == "true"
		}
	}
	// Since Go 1.24 a build in a checkout gets a pseudo-version
	// (v0.0.0-20261201220526-107d7b25a852, "+dirty" when modified); the
	// revision, its time and the word "modified" say the same more plainly.
	v := strings.TrimSuffix(info.Main.Version, "+dirty")
	if v != "" && v != "(devel)" && !pseudoVersion.MatchString(v) {
		if modified {
			v += " modified"
		}
		return v
	}
	if rev == "" {
		if v != "" && v != "(devel)" {
			return v
		}
		return "devel (built without version-control information)"
	}
	if len(rev) > 12 {
		rev = rev[:12]
	}
	v = "devel " + rev
	if at != "" {
		v += " " + at
	}
	if modified {
		v += " modified"
	}
	return v
}

// pseudoVersion matches the tail of a Go module pseudo-version: a UTC
// timestamp and a 12-digit revision prefix.
var pseudoVersion = regexp.MustCompile(`-(0\.)?\d{14}-[0-9a-f]{12}$`)

func versionCommand() *cli.Command {
	return &cli.Command{
		Name:  "version",
		Usage: "print kweigh's version (module version, or the revision it was built from)",
		Action: func(ctx context.Context, cmd *cli.Command) error {
			_, err := fmt.Fprintf(cmd.Root().Writer, "kweigh %s (%s, %s/%s)\n", versionString(), runtime.Version(), runtime.GOOS, runtime.GOARCH)
			return err
		},
	}
}
