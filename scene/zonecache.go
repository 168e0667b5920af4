package scene

import (
	"sync"

	"faultline/crystal"
)

// zoneCache keeps what the reflections of a zone cost to compute and do
// not owe to the deviation: the zone's list of reflections per |g| limit
// and each reflection's |F_g| and ξ_g per voltage. It belongs to a
// geometry stage (one crystal, one beam direction), so a rebuild after a
// change of s, thickness or model lists the reflections (for the warnings
// of every build) without recomputing structure factors. It is safe for
// concurrent use.
type zoneCache struct {
	cr   *crystal.Crystal
	beam [3]float64

	mu    sync.Mutex
	zones map[float64][]crystal.Reflection
	sf    map[[4]float64]sfEntry
}

// sfEntry is |F_g| and ξ_g (ok false when g has none: forbidden or
// unreachable) of one reflection at one voltage.
type sfEntry struct {
	fg   float64
	xi   float64
	xiOK bool
}

func newZoneCache(cr *crystal.Crystal, beam [3]float64) *zoneCache {
	return &zoneCache{cr: cr, beam: beam, zones: map[float64][]crystal.Reflection{}, sf: map[[4]float64]sfEntry{}}
}

// zone returns the reflections of the zone up to gMax (1/nm).
func (z *zoneCache) zone(gMax float64) ([]crystal.Reflection, error) {
	if z == nil {
		return nil, nil
	}
	z.mu.Lock()
	defer z.mu.Unlock()
	if r, ok := z.zones[gMax]; ok {
		return r, nil
	}
	r, err := z.cr.Zone(z.beam, gMax)
	if err != nil {
		return nil, err
	}
	z.zones[gMax] = r
	return r, nil
}

// factors returns |F_g| and ξ_g of hkl at kv.
func (z *zoneCache) factors(hkl [3]float64, kv float64) sfEntry {
	key := [4]float64{hkl[0], hkl[1], hkl[2], kv}
	z.mu.Lock()
	e, ok := z.sf[key]
	z.mu.Unlock()
	if ok {
		return e
	}
	e.fg = cmplxAbs(z.cr.StructureFactor(hkl, kv))
	if xi, err := z.cr.ExtinctionDistance(hkl, kv); err == nil {
		e.xi, e.xiOK = xi, true
	}
	z.mu.Lock()
	z.sf[key] = e
	z.mu.Unlock()
	return e
}
