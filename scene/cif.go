package scene

import "faultline/crystal"

// loadCIF reads a crystal from a CIF file.
func loadCIF(path string) (*crystal.Crystal, error) { return crystal.LoadCIF(path) }
