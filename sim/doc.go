// Package sim integrates the electron wave through each column of a foil
// containing defects, in the column approximation, and returns the exit
// intensities of the beams over a grid of columns.
//
// # Frame and equations
//
// The image frame has x along g, z along the beam pointing into the foil
// and y = z × x. A column at (x, y) runs from the entrance surface to the
// exit surface; γ(z) = g·R(x, y, z) in cycles is all the integrator needs of
// the displacement field R.
//
// The two-beam dynamical model solves the Howie–Whelan equations with
// anomalous absorption (Howie & Whelan 1961, Proc. R. Soc. A 263, 217;
// Hirsch, Howie, Nicholson, Pashley & Whelan 1965, Electron Microscopy of
// Thin Crystals, ch. 8) in the form whose coupling carries the phase of R:
//
//	dφ_0/dz = −(π/ξ'_0) φ_0 + q φ_g exp(+2πi(s z + g·R))
//	dφ_g/dz = q φ_0 exp(−2πi(s z + g·R)) − (π/ξ'_0) φ_g
//	q = iπ/ξ_g − π/ξ'_g
//
// Signs (stated once, with their sources, in the README's "Conventions"):
// s > 0 when the reciprocal-lattice point g lies inside the Ewald sphere
// (Hirsch et al. 1965, ch. 4); an atom of the perfect crystal at r sits at
// r + R(r), so a fault's phase angle is α = 2π g·R; z points along the
// electron beam from the entrance surface (the top of every figure) and
// g along +x (to the right of every picture). The tests in tests/ that
// reproduce the published contrast rules from rendered images
// (TestFaultTypeFromOuterFringes, TestDislocationImageSide,
// TestLoopInsideOutside, …) fail if any of these signs is flipped.
//
// The kinematical model is the amplitude–phase integral
// φ_g = (iπ/ξ_g) ∫ exp(−2πi(s z + g·R)) dz (Hirsch et al. 1965, ch. 7).
// The systematic row of 2N+1 beams n·g (SystematicRow, the
// Darwin–Howie–Whelan equations; Hirsch et al. 1965, ch. 12) has the same
// shape, with couplings q_{n−m} = iπλU_{(n−m)g} − πλU'_{(n−m)g} and phases
// exp(2πi((s_m − s_n) z + (m − n) g·R)), s_n = n s_1 + n(1−n)λg²/2 (the
// Ewald sphere to second order in the scattering angle); it slots into the
// same integrator, pool and Image. A perfect-crystal stretch is one N×N
// exponential (a scaled Taylor series, Al-Mohy & Higham 2011, or the
// Bloch-wave eigen-decomposition for long slabs). A slab with a departure
// is taken in the basis of the Bloch waves at its chord slope rounded to a
// grid (kept per grid slope, continued from anchor slopes by Newton's
// method), the departure entering as a perturbation of the local slope in
// the interaction picture: the first Magnus term (Magnus 1954; Blanes,
// Casas, Oteo & Ros 2009) in closed form for the cubic δ through the
// Gauss-node samples, so that the outer beams' fast phases are exact
// (rowbloch.go); a slab out of its reach takes the fourth-order
// commutator-free Magnus pair (Blanes & Moan 2006) with Taylor-series
// exponentials, in pieces of at most a tenth of a beat cycle. With 7
// beams the row agrees with a converged RK4 solution to better than 1e-4
// (TestRowAccuracyAgainstConverged; measured 7.3e-6) and whole renders
// with converged renders (TestRowWeakBeamDefaultToleranceAgainstConverged,
// tests.TestRowDefaultToleranceAgainstConverged; at most 2.7e-5).
//
// # Method
//
// The integrator works with χ_n = φ_n exp(2πi(s_n z + n γ(z))). A slab in
// which γ is linear, γ = γ_a + β z, is then a perfect crystal with every
// excitation error shifted by n β, and its transfer matrix is a closed-form
// matrix exponential (the Bloch-wave solution of the perfect crystal); in a
// perfect crystal the whole column is one such exponential. Where γ departs
// from its chord by δ(z), the two-beam slab is advanced by the classical
// fourth-order Magnus integrator (Iserles & Nørsett 1999; Blanes, Casas,
// Oteo & Ros 2009), one 2×2 exponential per slab, summed as a power series
// for short slabs, with δ sampled at the two Gauss–Legendre nodes; the mean
// absorption is applied once per column; the many-beam row uses its
// Bloch-wave step (above). A jump of γ
// across a fault plane or the cut
// of a dislocation (reported by a Jumper) is an exact phase factor
// exp(2πi n Δγ); a cavity (reported by a Voider) is a slab of vacuum.
//
// Step control: a slab is accepted when max|δ| at the nodes, weighted by
// 0.1 + (c/0.29)² for a slab holding c cycles of the beams' beat (the
// measured error of the fourth-order step per unit departure,
// TestSlabErrorModel), is at most the tolerance (DefaultTolerance, 5e-5
// cycles); the next slab's length is predicted from the same two numbers,
// and the first slab of a stretch holds half a beat cycle. With the
// default every exit intensity agrees with a converged solution to better
// than 1e-4 of the incident intensity (TestAccuracyAgainstConverged against
// fixed-step RK4; tests.TestDefaultToleranceAgainstConverged over whole
// images of real scenes), while far from the defects a column takes a
// handful of slabs. The row's Bloch-wave step errs at second order in a
// departure the nodes see, whatever the beat (TestRowSlabErrorModel), so
// its slabs are limited instead by max|δ| weighted by
// 0.05 + rowSecondOrder·max|δ| and by the quartic content found at each
// slab's midpoint (one more sample; see column.go): within the same 1e-4
// a row column takes 48–67 % fewer slabs than a two-beam one.
//
// # Fast paths
//
// The integrator needs only the scalar γ = g·R. A field that implements
// Phaser hands over a function for γ prepared once per render for the
// imaged g (a straight dislocation: K ln r + F(θ) with F tabulated, see
// package defects); any other field is evaluated through R.
//
// # Replay
//
// Record keeps, per column, the steps the integrator took from the field
// (slab lengths, chord rises, departures, jumps, vacuum); Samples.Replay
// integrates them again with another model (s, ξ_g, absorption) or a
// smaller thickness without evaluating the field: every slab is re-checked
// against the step control with the new beat (unless that beat is nowhere
// above the recorded one) and a column is integrated afresh where one
// fails; the slab the exit surface cuts is integrated over its part with
// g·R from the cubic through its four samples (see replay.go, also for the
// memory it takes).
//
// # Tabulated s
//
// Through a fixed sequence of recorded steps, every exit intensity is an
// entire function of the excitation error s. TabulateS replays the samples
// at the Chebyshev–Lobatto points of an interval [sLo, sHi] (doubling
// their number, which reuses the replays, until the tail of every column's
// and beam's Chebyshev coefficients is below DefaultSTableTail, 1e-6, or a
// cap is reached, which is an error) and STable.Image evaluates the series
// at any s of the interval by Clenshaw's recurrence (Clenshaw 1955, Math.
// Tables Aids Comput. 9, 118; the interpolant and its tail estimate:
// Trefethen 2013, Approximation Theory and Approximation Practice, ch. 3,
// 4 and 8). On the demo scene at 256² over s ± 0.01 /nm the build takes 21
// replays and the table 208 bytes per column; an evaluation costs under
// a hundredth of a render (tests.BenchmarkDemo256STable), and agrees with
// a replay within 1e-5, measured 7e-7 at worst on the demo scenes
// (tests.TestSTableAgreesWithReplay). See stable.go.
//
// # Concurrency
//
// Render spreads the rows of the grid over a pool of workers (Options.Workers,
// default GOMAXPROCS), honours context cancellation between rows, and
// reports progress row by row. Every column is computed by the same sequence
// of floating-point operations whatever the number of workers, so results
// are reproducible to the bit.
package sim
