// Package defects computes the displacement fields R(r) of crystal defects
// for diffraction-contrast simulation, and the elasticity they need.
//
// Everything is Cartesian, in nm, in the image frame: x along g, z along the
// beam pointing into the foil (entrance surface z = 0, exit z = t), y = z × x.
// There are no Miller indices here; the scene package converts them. A
// column is a line of constant (x, y); the simulator evaluates g·R along it.
// Every field implements R(p); fields with a surface across which R is
// discontinuous also implement Jumps (the simulator's Jumper), reporting
// the depths where a column crosses that surface, and cavities implement
// Voids. Sum superposes fields (linear elasticity) and merges their reports.
//
// # Burgers vector sense
//
// The displacement gains +b on a circuit taken right-handedly about the
// line sense u (anticlockwise seen with u pointing at the viewer):
// ∮ dR = +b. For a screw along +z with b = +|b|ẑ, R_z = |b|θ/2π grows with
// the polar angle θ. Tested in TestBurgersSenseScrew and by numerical Burgers
// circuits (TestBurgersCircuit*).
//
// # Cuts and jumps
//
// A straight dislocation's θ (or Stroh ln) term is multivalued; its branch
// cut is a half-plane bounded by the line, of direction e ⊥ u. Moving across
// it in the direction u × e, R jumps by −b (equivalently +b the other way).
// By default e is the beam direction +z made perpendicular to u (for a line
// along z: +x), so the cut lies in the plane containing the line and the
// beam: a column either lies in that plane or never meets it, R is
// continuous along every column and Jumps reports nothing. (Columns on the
// two sides of the projected line differ by the constant b, which changes
// only the phase of the diffracted amplitude, not an intensity.) Partial
// dislocations instead take e along their glide plane over the faulted
// ribbon, and then Jumps reports the crossing. A fault reports its plane,
// a loop its disc.
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
// (the by terms are the bx terms turned by a quarter turn about u). Within
// 0.001 nm of the line r is held at 0.001 nm so R stays finite.
//
// # Inclusion
//
// Coherent spherical inclusion, Ashby & Brown, Phil. Mag. 8 (1963) 1083:
// R = ε r inside, R = ε r0³ r/r³ outside; from the free misfit δ with equal
// isotropic constants, ε = δ(1+ν)/(3(1−ν)) (Eshelby 1957).
//
// # Stiffness rotation
//
// Voigt matrices (order 11, 22, 33, 23, 13, 12) rotate by Bond's matrix
// (Bond 1943; Ting, Anisotropic Elasticity, 1996): C' = M C Mᵀ.
//
// # Surfaces
//
// Fields are those of the defect in an infinite medium; no image forces or
// surface relaxation are applied. The foil surfaces enter only through the
// column limits the simulator integrates between.
package defects
