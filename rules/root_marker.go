package rules

import "github.com/BurntSushi/toml"

// IsRootMarker reports whether data is a folder spec file whose only key is
// "root = true": it sets no limits and only marks the top of a delivery
// tree, so that files below it are not judged by a kweigh.toml further up
// (the convention of editor and version-control config files). Callers
// that resolve folder specs check this before Parse; given to Parse such a
// file would be a spec without limits.
func IsRootMarker(data []byte) bool {
	var raw map[string]any
	if _, err := toml.Decode(string(data), &raw); err != nil || len(raw) != 1 {
		return false
	}
	root, ok := raw["root"].(bool)
	return ok && root
}
