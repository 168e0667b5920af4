// Package defects computes the displacement fields R(r) of crystal defects
// for diffraction-contrast simulation, and the elasticity they need.
//
// Everything is Cartesian, in nm, in the image frame: x along g, z along the
// beam pointing into the foil (entrance surface z = 0, exit z = t), y = z × x.
// There are no Miller indices here; the scene package converts them, and
// rotates stiffness matrices into the image frame (RotateStiffness). A
// column is a line of constant (x, y); the simulator evaluates g·R along it.
// Every field implements R(p); fields with a surface across which R is
// discontinuous implement Jumps (the simulator's Jumper), reporting the
// depths where a column crosses that surface, and cavities implement Voids.
// Sum superposes fields (linear elasticity) and merges their reports.
//
// # Burgers vector sense
//
// The displacement gains +b on a circuit taken right-handedly about the
// line sense u (anticlockwise seen with u pointing at the viewer):
// ∮ dR = +b. For a screw along +z with b = +|b|ẑ, R_z = |b|θ/2π grows with
// the polar angle θ. Tested by TestBurgersSenseScrew and by numerical
// Burgers circuits for every dislocation kind (isotropic, Stroh, partials,
// loops). With this sense, a positive edge dislocation (u = +z, b = +|b|x̂)
// has its extra half-plane at y > 0 (σ_xx < 0 there, Hirth & Lothe
// eq. 3-43).
//
// # Which side moves: faults, loops, inclusions
//
// A Fault displaces the crystal on the side its normal n̂ points to by the
// fault vector, R = shift for n̂·(p − at) > 0. With that convention an
// intrinsic fault on a close-packed plane (a removed layer, the two sides
// closing up) has shift −d n̂ (on fcc (1 1 1): −1/3[1 1 1]) and an
// extrinsic one (an inserted layer) +d n̂. A Loop's line runs right-handedly
// about its normal, so R(n̂ side) − R(other side) = −b across its disc:
// b·n̂ > 0 is a vacancy loop, b·n̂ < 0 an interstitial loop. An Inclusion
// with ε > 0 expands (R = εr outward). These are the README's
// "Conventions"; tests/conventions_test.go checks them through a scene.
//
// # Cuts and jumps
//
// A straight dislocation's θ (or Stroh ln) term is multivalued; its branch
// cut is a half-plane bounded by the line, of direction e ⊥ u. Moving across
// it in the direction u × e, R jumps by −b (by +b the other way). By
// default e is the beam direction +z made perpendicular to u (for a line
// along z: +x), so the cut lies in the plane containing the line and the
// beam: a column either lies in that plane or never meets it, R is
// continuous along every column and Jumps reports nothing. (Columns on the
// two sides of the projected line differ by the constant b, which changes
// only the phase of the diffracted amplitude, not an intensity.)
//
// Partials of a Dissociated dislocation take e along their glide plane: the
// leading partial b1 at at + (d/2)ŝ and the trailing b2 at at − (d/2)ŝ,
// ŝ = n̂ × û, both cut along −ŝ. Across the glide plane R(n̂ side) − R(other)
// is then 0 beyond the leading partial, b1 (the fault vector) over the
// ribbon, and b1 + b2 = b (a lattice vector, invisible) beyond the
// trailing partial; Jumps reports the crossing. A Fault reports its plane;
// a BoundedFault its strip; a Loop its disc, across which
// R(n̂ side) − R(other) = −b.
//
// # Isotropic straight dislocation
//
// Hirth & Lothe, Theory of Dislocations, 2nd ed. (1982), eqs. 3-2 and 3-45.
// In the dislocation frame (x', y', u) with x' = −e, y' = u × x',
// θ = atan2(y', x') ∈ (−π, π], r² = x'² + y'², and b = (bx, by, bz):
//
//	u_x' = bx/2π [θ + x'y'/(2(1−ν)r²)] + by/2π [(1−2ν)/(4(1−ν)) ln r² + (y'²−x'²)/(4(1−ν)r²)]
//	u_y' = −bx/2π [(1−2ν)/(4(1−ν)) ln r² + (x'²−y'²)/(4(1−ν)r²)] + by/2π [θ − x'y'/(2(1−ν)r²)]
//	u_u  = bz θ/2π
//
// (the by terms are the bx terms turned a quarter turn about u). Within
// 0.001 nm of the line r is held at 0.001 nm so R stays finite.
//
// # Anisotropic straight dislocation
//
// Stroh's sextic formalism (Stroh, Phil. Mag. 3 (1958) 625; Hirth & Lothe
// 1982, ch. 13; Ting, Anisotropic Elasticity, 1996): with the stiffness in
// the dislocation frame, Q_ik = C_i1k1, R_ik = C_i1k2, T_ik = C_i2k2,
//
//	N = [[−T⁻¹Rᵀ, T⁻¹], [R T⁻¹ Rᵀ − Q, −R T⁻¹]],  N (a, b) = p (a, b),
//
// solved by gonum's mat.Eigen; the three roots with Im p > 0 are normalised
// by 2 aᵀb = 1, and
//
//	u = (1/π) Im Σ_α a_α (b_αᵀ b) ln(x' + p_α y').
//
// The coefficients a_α b_αᵀ b are computed once per dislocation; a point
// costs three logarithms and three arctangents. The closure relations
// A Bᵀ + Ā B̄ᵀ = I, B Bᵀ + B̄ B̄ᵀ = 0, A Aᵀ + Ā Āᵀ = 0 are checked; if they
// fail by more than 1e-8 the sextic is degenerate (an exactly isotropic
// medium; a transversely isotropic one with the line along its axis) and
// this rule applies: the in-plane field is Hirth & Lothe's with the 2-D
// rotation average λ = (C11+C22+6C12−4C66)/8, μ = (C11+C22−2C12+4C66)/8,
// ν = λ/(2(λ+μ)) of the dislocation-frame constants, and the screw part is
// the exact anti-plane field u_3 = (b_3/2π) arg(x' + p₃y'),
// p₃ = (−C45 + i√(C44C55 − C45²))/C44; in-plane/anti-plane couplings are
// dropped. The rule is exact in both named cases, and the sextic is only
// found degenerate within ~1e-7 of them, where the rule's error is ~1e-9 nm.
// Dislocation.Elasticity says which solution is in use.
//
// # Dissociation width
//
// SeparationFromSFE balances the glide force between parallel partials,
// F = b2ᵀ K b1/(2π d), K the energy-factor matrix (K = −2i B Bᵀ in Stroh's
// formalism; isotropic K = diag(μ/(1−ν), μ/(1−ν), μ), Hirth & Lothe
// eqs. 3-50, 3-51, ch. 10), against the fault energy γ: d = b2ᵀ K b1/(2πγ).
// For Shockley partials in an isotropic medium this is the textbook
// d = μ b_p² (2−ν)/(8πγ(1−ν)) (1 − 2ν cos 2β/(2−ν)).
//
// # Faults, inclusions, loops, cavities
//
// Fault: R = shift on the side its normal points to (α = 2π g·R in the
// column). BoundedFault: the same over a strip of its plane, rigid, with no
// field of its bounding partials. Inclusion: Ashby & Brown, Phil. Mag. 8
// (1963) 1083: R = ε r inside, ε r0³ r/r³ outside, ε = δ(1+ν)/(3(1−ν)) from
// the free misfit δ (Eshelby 1957). Loop: Burgers' formula (Burgers 1939;
// Hirth & Lothe 1982, §4-4) evaluated in closed form for the circle
// (complete elliptic integrals; the solid angle after Paxton 1959, with
// Bulirsch's 1969 algorithm for the third kind), blended smoothly into a
// second-moment multipole far field beyond six radii; isotropic only (see
// Loop for the formulas and accuracy). Cavity: no crystal inside (Voids), no
// displacement.
//
// # Fast path: g·R
//
// The simulator needs only the scalar g·R, and finds it through Phaser.
// A straight dislocation's g·R is k ln r² + F(ψ) in the plane normal to
// its line (isotropic and Stroh alike; see lineTable), F a piecewise cubic
// in the pseudo-angle ψ = y'/(|x'| + |y'|) (±2 − that behind the line),
// built once per g to 2e-9 cycles (TestLinePhaseMatchesDirect holds it to
// 1e-7 of the direct formula at the core and on both sides of the cut).
// ln r² is lnPos: the exponent bits give e ln 2, the top nine bits of the
// mantissa a cell of a 512-entry table, and ln(1 + r), |r| ≤ 1/1024, four
// terms of its series (within 1e-15 relative of math.Log over the whole
// normal range, TestLnPos). Every member of a Sum (nested sums and the
// partials of a dissociated dislocation included) joins one phaseSum:
// its lines and inclusions are evaluated in one loop with no call per
// member, the partials of a dissociated dislocation share ex·p and ey·p,
// a cavity adds nothing, and the other members cost a call: a loop its
// own Phase (loopPhase: the scalars of its closed form and of its far
// field dotted with g, TestLoopPhaseMatchesDirect), a fault g·R through
// R. BenchmarkPhaseSum and BenchmarkSumDirect compare the two ways on a
// sum like the demo scene's, BenchmarkPhaseLoop and BenchmarkLoop (by shell) a
// loop's.
//
// # Stiffness rotation
//
// Voigt matrices (order 11, 22, 33, 23, 13, 12) rotate by Bond's matrix
// (Bond 1943; Ting 1996): C' = M C Mᵀ.
//
// # Surfaces
//
// Every field is that of the defect in an infinite medium. No image forces
// and no surface relaxation are implemented: in particular a dislocation
// ending on a foil surface does not get Eshelby & Stroh's (1951) twist
// term for a screw normal to the surface, nor the surface relaxation of
// inclined dislocations. A defect that crosses a surface is cut by it only
// in the sense that the simulator integrates each column from z = 0 to
// z = t: R outside the crystal is still defined (the infinite-medium value)
// but never sampled. Cavities must lie inside the foil; the scene checks that against
// the foil's surfaces.
package defects
