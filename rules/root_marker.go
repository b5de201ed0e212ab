package rules

import (
	"bytes"

	"github.com/BurntSushi/toml"
)

// maxRootMarkerBytes bounds what IsRootMarker decodes.
const maxRootMarkerBytes = 4096

// IsRootMarker reports whether data is a folder spec file whose only key is
// "root = true": it sets no limits and only marks the top of a delivery
// tree, so that files below it are not judged by a kweigh.toml further up
// (the convention of editor and version-control config files). Callers
// that resolve folder specs check this before Parse; given to Parse such a
// file would be a spec without limits.
func IsRootMarker(data []byte) bool {
	// A marker is one line (and perhaps comments): anything longer is not
	// one, and is not handed to the TOML decoder here, before Parse's own
	// bounds on size and nesting apply.
	if len(data) > maxRootMarkerBytes || !bytes.Contains(data, []byte("root")) {
		return false
	}
	var raw map[string]any
	if _, err := toml.Decode(string(data), &raw); err != nil || len(raw) != 1 {
		return false
	}
	root, ok := raw["root"].(bool)
	return ok && root
}
