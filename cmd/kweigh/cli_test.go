package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"runtime/debug"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// TestLayoutAppliesWhereItFits: in a mixed batch --layout applies to the
// files whose channel count it fits; the others keep their own layout with
// a note naming the option (issue 9).
func TestLayoutAppliesWhereItFits(t *testing.T) {
	dir := t.TempDir()
	writeTestFile(t, dir, "a-stereo.wav", lineUpWAV())
	writeTestFile(t, dir, "b-mono.wav", audiotest.PCMWAV(48000, 1, 16, audiotest.Sine(48000, 2, 997, 0.1)))
	code, out, errOut := kweigh(t, "measure", "--format", "json", "--layout", "R,L", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s\n%s", code, errOut, out)
	}
	var doc struct {
		Files []struct {
			Path   string   `json:"path"`
			Layout []string `json:"channel_layout"`
			Source string   `json:"layout_source"`
			Notes  []string `json:"notes"`
			Error  string   `json:"error"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Files) != 2 {
		t.Fatalf("%v: %s", err, out)
	}
	stereo, mono := doc.Files[0], doc.Files[1]
	if stereo.Source != "user" || strings.Join(stereo.Layout, ",") != "R,L" {
		t.Errorf("stereo file: layout %v from %s, want R,L from user", stereo.Layout, stereo.Source)
	}
	if mono.Error != "" || mono.Source == "user" || !strings.Contains(strings.Join(mono.Notes, " "), "--layout") {
		t.Errorf("mono file: error %q, source %s, notes %v: want its own layout and a note naming --layout", mono.Error, mono.Source, mono.Notes)
	}
}

// TestVersionFromBuildInfo: the version comes from the build information,
// never a bare "dev".
func TestVersionFromBuildInfo(t *testing.T) {
	tests := []struct {
		name string
		info debug.BuildInfo
		want string
	}{
		{"installed", debug.BuildInfo{Main: debug.Module{Version: "v1.4.0"}}, "v1.4.0"},
		{"local build", debug.BuildInfo{Main: debug.Module{Version: "(devel)"}, Settings: []debug.BuildSetting{
			{Key: "vcs.revision", Value: "0123456789abcdef0123"}, {Key: "vcs.time", Value: "2026-11-30T10:00:00Z"}, {Key: "vcs.modified", Value: "false"}}},
			"devel 0123456789ab 2026-11-30T10:00:00Z"},
		{"local build with changes", debug.BuildInfo{Main: debug.Module{Version: "(devel)"}, Settings: []debug.BuildSetting{
			{Key: "vcs.revision", Value: "0123456789abcdef0123"}, {Key: "vcs.modified", Value: "true"}}},
			"devel 0123456789ab modified"},
		{"no VCS", debug.BuildInfo{Main: debug.Module{Version: "(devel)"}}, "devel (built without version-control information)"},
		// Go 1.24 and later stamp a pseudo-version from the checkout.
		{"pseudo-version", debug.BuildInfo{Main: debug.Module{Version: "v0.0.0-20261201220526-107d7b25a852+dirty"}, Settings: []debug.BuildSetting{
			{Key: "vcs.revision", Value: "107d7b25a8521234"}, {Key: "vcs.modified", Value: "true"}}},
			"devel 107d7b25a852 modified"},
		{"tagged checkout with changes", debug.BuildInfo{Main: debug.Module{Version: "v1.4.0+dirty"}, Settings: []debug.BuildSetting{
			{Key: "vcs.revision", Value: "107d7b25a8521234"}, {Key: "vcs.modified", Value: "true"}}},
			"v1.4.0 modified"},
	}
	for _, tc := range tests {
		if got := versionFrom(&tc.info); got != tc.want {
			t.Errorf("%s: %q, want %q", tc.name, got, tc.want)
		}
	}
}

// TestVersionOfLocalBuild: a binary built from a git checkout reports the
// revision it was built from, in `version`, `--version` and JSON. The
// checkout is a fresh clone of this one: the go command records VCS
// information only where .git is a folder, not in a linked work tree.
func TestVersionOfLocalBuild(t *testing.T) {
	top, err := exec.Command("git", "rev-parse", "--show-toplevel").Output()
	if err != nil {
		t.Skip("not a git work tree")
	}
	clone := filepath.Join(t.TempDir(), "kweigh")
	if out, err := exec.Command("git", "clone", "-q", "--no-hardlinks", strings.TrimSpace(string(top)), clone).CombinedOutput(); err != nil {
		t.Fatalf("git clone: %v\n%s", err, out)
	}
	head, err := exec.Command("git", "-C", clone, "rev-parse", "HEAD").Output()
	if err != nil {
		t.Fatal(err)
	}
	bin := filepath.Join(t.TempDir(), "kweigh")
	build := exec.Command("go", "build", "-trimpath", "-buildvcs=true", "-o", bin, "./cmd/kweigh")
	build.Dir = clone
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	rev := strings.TrimSpace(string(head))[:12]
	for _, args := range [][]string{{"version"}, {"--version"}} {
		out, err := exec.Command(bin, args...).Output()
		if err != nil || !strings.Contains(string(out), "devel "+rev) || strings.Contains(string(out), "modified") {
			t.Errorf("kweigh %v: %q (%v), want the revision %s, unmodified", args, out, err, rev)
		}
	}
	file := writeTestFile(t, t.TempDir(), "ep.wav", lineUpWAV())
	out, _ := exec.Command(bin, "measure", "--format", "json", file).Output()
	var doc struct {
		Version string `json:"version"`
	}
	if err := json.Unmarshal(out, &doc); err != nil || !strings.Contains(doc.Version, rev) {
		t.Errorf("JSON version %q (%v), want the revision %s", doc.Version, err, rev)
	}
}

// TestCommandLineFirstContact: help, completion, an unknown command and a
// bare `kweigh` (issue 9).
func TestCommandLineFirstContact(t *testing.T) {
	code, _, errOut := kweigh(t)
	if code != exitTrouble || !strings.Contains(errOut, "usage: kweigh COMMAND") {
		t.Errorf("bare kweigh: exit %d, stderr %q; want short usage and exit 2", code, errOut)
	}
	code, _, errOut = kweigh(t, "chek", "ep.wav")
	if code != exitTrouble || !strings.Contains(errOut, "unknown command 'chek'; did you mean 'check'?") {
		t.Errorf("kweigh chek: exit %d, stderr %q", code, errOut)
	}
	code, _, errOut = kweigh(t, "help", "chek")
	if code != exitTrouble || !strings.Contains(errOut, "unknown command 'chek'; did you mean 'check'?") {
		t.Errorf("kweigh help chek: exit %d, stderr %q", code, errOut)
	}
	code, _, errOut = kweigh(t, "frobnicate")
	if code != exitTrouble || !strings.Contains(errOut, "unknown command 'frobnicate'") || strings.Contains(errOut, "did you mean") {
		t.Errorf("kweigh frobnicate: exit %d, stderr %q", code, errOut)
	}
	for _, args := range [][]string{{"help", "check"}, {"check", "--help"}} {
		code, out, _ := kweigh(t, args...)
		if code != exitOK || !strings.Contains(out, "kweigh check") || !strings.Contains(out, "EXIT STATUS") || !strings.Contains(out, "130") {
			t.Errorf("kweigh %v: exit %d\n%s", args, code, out)
		}
	}
	for _, shell := range []string{"bash", "zsh", "fish"} {
		code, out, _ := kweigh(t, "completion", shell)
		if code != exitOK || !strings.Contains(out, "kweigh") || len(out) < 200 {
			t.Errorf("completion %s: exit %d, %d bytes", shell, code, len(out))
		}
	}
	if code, out, _ := kweigh(t, "help"); code != exitOK || !strings.Contains(out, "completion") || !strings.Contains(out, "version") {
		t.Errorf("kweigh help: exit %d\n%s", code, out)
	}
}

// TestSpecsMachineOutputAndLegend: `specs show` and `specs check` honour
// --format json; `specs show` explains its markers in the README's words;
// `specs --help` gives its own exit statuses (issue 9).
func TestSpecsMachineOutputAndLegend(t *testing.T) {
	code, out, _ := kweigh(t, "specs", "show", "--format", "json", "atsc-a85")
	var spec struct {
		ID     string `json:"id"`
		Limits []struct {
			Check, Limit, Source string
		} `json:"limits"`
	}
	if err := json.Unmarshal([]byte(out), &spec); err != nil || code != exitOK || spec.ID != "atsc-a85" {
		t.Fatalf("specs show --format json: exit %d, %v\n%s", code, err, out)
	}
	found := false
	for _, l := range spec.Limits {
		// ATSC A/85:2013: target -24 LKFS.
		found = found || l.Check == "integrated" && strings.Contains(l.Limit, "-24.0")
	}
	if !found {
		t.Errorf("integrated limit -24 missing: %+v", spec.Limits)
	}

	dir := t.TempDir()
	good := writeTestFile(t, dir, "good.toml", []byte("name = \"saltmarsh-fm\"\nextends = \"ebu-r128\"\n"))
	bad := writeTestFile(t, dir, "bad.toml", []byte("name = \"x\"\nextends = \"ebu-r128\"\n[loudness]\nmax_truepeak_dbtp = -2\n"))
	code, out, _ = kweigh(t, "specs", "check", "--format", "json", good, bad)
	var checked struct {
		Files []struct {
			Path     string `json:"path"`
			Valid    bool   `json:"valid"`
			Problems []struct {
				Line int    `json:"line"`
				Key  string `json:"key"`
			} `json:"problems"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(out), &checked); err != nil || code != exitTrouble || len(checked.Files) != 2 {
		t.Fatalf("specs check --format json: exit %d, %v\n%s", code, err, out)
	}
	if !checked.Files[0].Valid || checked.Files[1].Valid || len(checked.Files[1].Problems) != 1 ||
		checked.Files[1].Problems[0].Line != 4 || checked.Files[1].Problems[0].Key != "loudness.max_truepeak_dbtp" {
		t.Errorf("specs check results %+v", checked.Files)
	}

	_, text, _ := kweigh(t, "specs", "show", "ebu-r128")
	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(strings.TrimSpace(markerLegend), "\n")[1:] {
		if !strings.Contains(text, strings.TrimSpace(line)) {
			t.Errorf("specs show lacks the legend line %q", line)
		}
		// README's table row: | `[marker]` | meaning |
		marker, meaning, _ := strings.Cut(strings.TrimSpace(line), "]")
		marker += "]"
		row := "| `" + marker + "` | " + strings.TrimSpace(meaning) + " |"
		if !strings.Contains(string(readme), row) {
			t.Errorf("README.md lacks the row %q (README and tool use the same words)", row)
		}
	}
	if code, out, _ := kweigh(t, "specs", "--help"); code != exitOK || !strings.Contains(out, "an invalid spec file") {
		t.Errorf("specs --help: exit %d, want its own exit statuses\n%s", code, out)
	}
}
