package scene

import (
	"errors"

	"faultline/crystal"
)

// loadCIF reads a crystal from a CIF file.
func loadCIF(path string) (*crystal.Crystal, error) {
	_ = path
	return nil, errors.New("CIF import is not built yet; use material or cell")
}
