package sweep

import (
	"encoding/json"

	"faultline/scene"
)

// setOverride applies one override to a scene through the scene package's
// override language (scene.Set), so a sweep, --set and the window share
// one meaning for every path.
func setOverride(sc *scene.Scene, path string, value json.RawMessage) error {
	return scene.Set(sc, path, value)
}

// setOverrides applies a job's overrides together (scene.SetAll), so
// fields that only make sense together (the pixels and the field of view)
// may change together.
func setOverrides(sc *scene.Scene, ov []Override) error {
	edits := make([]scene.Edit, len(ov))
	for i, o := range ov {
		edits[i] = scene.Edit{Path: o.Path, Value: o.Value}
	}
	return scene.SetAll(sc, edits...)
}
