package defects

import "sync"

// StrohCache keeps the solutions of the Stroh sextic eigenproblem of one
// medium, keyed by the stiffness in the dislocation frame (so by the line
// direction and the frame about it): a scene rebuilt after a change that
// leaves the crystal and the orientation alone (a moved dislocation, a
// new b) reuses them instead of solving again. The solution does not
// depend on the Burgers vector. It is safe for concurrent use; the zero
// value is not usable, use NewStrohCache.
type StrohCache struct {
	mu     sync.Mutex
	m      map[[6][6]float64]*strohSolution
	solves int
}

// NewStrohCache returns an empty cache.
func NewStrohCache() *StrohCache {
	return &StrohCache{m: map[[6][6]float64]*strohSolution{}}
}

// Solves returns how many eigenproblems the cache has solved (misses).
func (c *StrohCache) Solves() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.solves
}

// solve returns the solution for the dislocation-frame stiffness cd,
// solving it on a miss; a nil cache solves every time.
func (c *StrohCache) solve(cd [6][6]float64) (*strohSolution, error) {
	if c == nil {
		return solveStroh(cd)
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if sol, ok := c.m[cd]; ok {
		return sol, nil
	}
	sol, err := solveStroh(cd)
	if err != nil {
		return nil, err
	}
	c.solves++
	c.m[cd] = sol
	return sol, nil
}
