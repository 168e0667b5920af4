package sim

// ServesGeometry reports whether Replay can render p from these samples
// when the caller vouches that p's displacement field is the recorded one
// (built from the same scene geometry by another builder, so the two
// fields are equal values but not the same pointer): g, foil normal, grid
// and tolerance equal, and a thickness up to the recorded one. Serves
// checks the field as well.
func (s *Samples) ServesGeometry(p *Problem) bool {
	return s.servesThickness(p) && (p.Field == nil) == (s.p.Field == nil)
}
