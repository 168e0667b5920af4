// Package crystal describes crystals for diffraction-contrast simulation:
// unit cells of any system, Miller and Miller–Bravais indices as the trade
// writes them, atoms expanded by symmetry, CIF import, electron scattering
// factors, structure factors, extinction distances, Fourier coefficients of
// the crystal potential, the relativistic electron wavelength, the
// reflections of a zone, and built-in materials with their elastic
// constants.
//
// # Frames and units
//
// Lengths in nm, reciprocal lengths in 1/nm (no factor 2π), voltages in kV,
// elastic constants in GPa, angles in degrees. The crystal Cartesian frame
// has a along x, b in the xy plane and c completing a right-handed set
// (International Tables for Crystallography Vol. B, ch. 1.1). The metric
// tensor G_ij = a_i·a_j and its inverse G* give lengths, d-spacings
// (1/d² = hᵀG*h) and angles in every system.
//
// Four-index Miller–Bravais indices of hexagonal cells are converted on
// entry: (hkil) → (hkl) with i = −(h+k); [uvtw] → [UVW] with U = u − t,
// V = v − t, W = w and t = −(u+v) (Frank 1965, Acta Cryst. 18, 862); and
// back by u = (2U − V)/3, v = (2V − U)/3.
//
// # Indices as written
//
// ParseIndices reads "[1 -1 0]", "[1-10]" (one digit per index), "(1 1 1)",
// "1/2[1 1 0]", "a/2[1 1 0]", "1/3[1 1 -2 0]", "<1 1 0>", "{1 1 1}", with
// commas or spaces; Cell.Burgers turns such text into fractional [uvw], and
// Cell.FormatDirection / FormatPlane write vectors back the same way (four
// indices on a hexagonal cell).
//
// # Atoms, symmetry and CIF
//
// New expands an asymmetric unit by "x,y,z"-style operators (International
// Tables Vol. A notation) and/or the translations of a centring letter,
// wraps positions into the cell and merges the images of an atom closer
// than 0.01 nm at their mean position. ParseCIF and LoadCIF read the cell,
// operators and atom sites of a CIF 1.1 data block (Hall, Allen & Brown
// 1991, Acta Cryst. A47, 655; IUCr CIF 1.1 syntax specification), with
// U_eq from anisotropic parameters by Fischer & Tillmanns (1988, Acta
// Cryst. C44, 775); errors carry the line number.
//
// # Zones
//
// Zone lists the g of a zone [uvw] by the Weiss zone law h u + k v + l w = 0
// up to a |g| limit, flagging the kinematically forbidden ones.
//
// # Electron wavelength
//
//	λ = h / sqrt(2 m0 e E (1 + eE/(2 m0 c²))),  γ = 1 + eE/(m0 c²)
//
// with CODATA 2018 constants (Williams & Carter, Transmission Electron
// Microscopy, 2009, ch. 1).
//
// # Scattering and structure factors
//
// Elastic electron scattering factors of the neutral atoms are the
// five-Gaussian fits of International Tables for Crystallography Vol. C
// (2004), Table 4.3.2.2 (Peng, Ren, Dudarev & Whelan 1996, Acta Cryst. A52,
// 257), for Z = 1–98:
//
//	f(s) = Σ_{i=1..5} a_i exp(−b_i s²),  s = sinθ/λ = |g|/2  (f in Å, s in 1/Å)
//
// The structure factor, in nm, sums every atom of the cell with its
// occupancy and Debye–Waller factor B = 8π²⟨u²⟩:
//
//	F_g = γ Σ_j occ_j f_j(s) exp(−B_j s²) exp(−2πi g·r_j)
//
// and the two-beam extinction distance is
//
//	ξ_g = π V_c cos θ_B / (λ |F_g|)
//
// (Hirsch, Howie, Nicholson, Pashley & Whelan, Electron Microscopy of Thin
// Crystals, 1965). A reflection is kinematically forbidden when |F_g| is
// below 1e-6 of Σ_j |f_j| (the in-phase sum).
//
// The Fourier coefficients of the potential are U_g = F_g/(π V_c) in 1/nm²
// (U_g = 2 m e V_g / h², m relativistic), so 1/ξ_g = λ |U_g| / cos θ_B.
// Absorption is phenomenological (Hashimoto, Howie & Whelan 1962, Proc. R.
// Soc. A 269, 80): U'_g = r U_g with r = ξ_g/ξ'_g (0.1 by common practice),
// the optical potential coefficient being U_g + i U'_g.
//
// # Kikuchi lines
//
// The excitation error from the offset Δx of the excess Kikuchi line from
// the g spot, with x the 000–g spacing on the same pattern, is
// s = λ g² Δx / x (Williams & Carter 2009, ch. 19; Hirsch et al. 1965,
// ch. 4).
//
// # Elastic constants
//
// Stiffness matrices in Voigt notation; cubic from C11, C12, C44, hexagonal
// from C11, C12, C13, C33, C44 with C66 = (C11 − C12)/2 (Nye, Physical
// Properties of Crystals, 1957); stability by positive definiteness (Born &
// Huang 1954); isotropic equivalents by the Voigt (1928) average.
package crystal
