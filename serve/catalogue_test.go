package serve

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/rules"
)

// TestCatalogue: built-ins first, extra specs by id, the default spec given
// by path may also sit in the folder, two different specs with one id are
// an error naming both, and a spec file without a name is offered by its
// file name.
func TestCatalogue(t *testing.T) {
	dir := t.TempDir()
	house := filepath.Join(dir, "saltmarsh.toml")
	writeFile(t, house, "name = \"saltmarsh-fm\"\nextends = \"ebu-r128\"\n[loudness]\ntolerance_lu = 0.5\n")
	writeFile(t, filepath.Join(dir, "quayside.toml"), "extends = \"aes-td1004\"\n[loudness]\nmax_true_peak_dbtp = -2.0\n")
	extra, err := LoadSpecDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	def, err := engine.LoadSpec(house)
	if err != nil {
		t.Fatal(err)
	}
	c, err := NewCatalogue(NamedSpec(def), extra...)
	if err != nil {
		t.Fatalf("default spec also in the folder: %v", err)
	}
	var ids []string
	for _, s := range c.Specs() {
		ids = append(ids, s.ID)
	}
	n := len(rules.Builtin())
	if len(ids) != n+2 || ids[n] != "quayside" || ids[n+1] != "saltmarsh-fm" || c.Default() != "saltmarsh-fm" {
		t.Errorf("ids %v, default %q", ids, c.Default())
	}
	if s, ok := c.Lookup(""); !ok || s.ID != "saltmarsh-fm" {
		t.Errorf("the empty id is not the default")
	}

	other := filepath.Join(t.TempDir(), "saltmarsh.toml")
	writeFile(t, other, "name = \"saltmarsh-fm\"\nextends = \"ebu-r128\"\n[loudness]\ntolerance_lu = 0.8\n")
	clash, _ := engine.LoadSpec(other)
	if _, err := NewCatalogue(clash, extra...); err == nil || !strings.Contains(err.Error(), other) || !strings.Contains(err.Error(), house) {
		t.Errorf("two specs named saltmarsh-fm: %v", err)
	}
	shadow := filepath.Join(t.TempDir(), "r128.toml")
	writeFile(t, shadow, "name = \"ebu-r128\"\nextends = \"ebu-r128\"\n[loudness]\ntolerance_lu = 3\n")
	s, _ := engine.LoadSpec(shadow)
	if _, err := NewCatalogue(s); err == nil || !strings.Contains(err.Error(), "built-in") {
		t.Errorf("a file spec shadowing a built-in: %v", err)
	}
	if _, err := LoadSpecDir(t.TempDir()); err == nil {
		t.Errorf("a folder without specs was accepted")
	}
}
