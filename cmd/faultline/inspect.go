package main

import (
	"encoding/json"
	"io"

	"faultline/micrograph"
)

// cmdInspect prints what a micrograph file holds.
func cmdInspect(args []string, stdout io.Writer) error {
	fs := newFlags("inspect")
	asJSON := fs.Bool("json", false, "write JSON")
	path, err := parseArg(fs, args, stdout, "micrograph file (add #N for image N of a stack)")
	if err != nil {
		return err
	}
	m, err := micrograph.Read(path)
	if err != nil {
		return err
	}
	in := m.Info()
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(in)
	}
	return in.WriteText(stdout)
}
