// Package scene reads, validates, edits and saves scene files (version 1,
// JSON; the README describes every field) and builds a scene into what the
// simulator needs. It is where Miller indices become Cartesian vectors and
// where the packages crystal, defects and sim meet.
//
// # Errors
//
// Every problem with the content of a scene is a *FieldError naming the
// field by its path in the file — "foil.thickness_nm", "diffraction.g",
// "defects[1].b" — and wrapping ErrInvalid, so the command line exits 2
// with one line and the window shows the message under the field.
//
// # Overrides by path
//
// Set, SetJSON and SetAll change a scene by the same paths the errors use:
//
//	scene.Set(sc, "foil.thickness_nm", 80.0)
//	scene.Set(sc, "diffraction.g", []float64{1, 1, -1})
//	scene.Set(sc, "defects[0].b", "1/2[1 0 1]")
//	scene.SetJSON(sc, "defects[1].at_nm", "[0, 10, 40]")
//
// A path is field names joined by dots, each optionally followed by list
// indices in brackets ("crystal.atoms[0].xyz", "defects[0].partials[1]",
// "image.pixels[0]"). The value is checked against the field's type and
// the whole scene is validated as Parse validates a file; on any error
// the scene is left as it was (Set is atomic). nil (JSON null) clears an
// optional field, and at a list element removes it ("defects[2]"). The
// four forms of the deviation — s_per_nm, w, weak_beam and
// deviation_from_kikuchi — exclude each other: setting one clears the
// others. SetAll applies several edits and validates once, for fields
// that are valid only together (the pixel counts and the field of view,
// which must give square pixels). The command line offers the same as
// --set PATH=VALUE, the window's fields go through it, and sweeps and fits
// change scenes with it.
//
// # Defect descriptions
//
// Each defect type is described once (DefectSpecs): its fields with their
// kind (position, direction, plane, Burgers text, number, choice,
// interval), unit and physical range, which are required, which exclude
// each other or go together, the values of a new defect, and the fields
// of its list line. Validation, Template, Defect.Summary and the window's
// defect form are driven by these descriptions; only the physics of a
// type (buildDefect) reads its fields by name.
//
// # Staged build
//
// Build compiles a scene in three stages; a Builder keeps each stage's
// result and re-runs a stage only when its inputs change:
//
//  1. Material: the crystal — a built-in preset, a CIF file or an explicit
//     cell — with its elastic constants, and a cache of the Stroh
//     solutions of its dislocations, one per line direction and frame
//     (defects.StrohCache). Its key is the crystal section of the scene
//     and the bytes of the CIF file it names, so rewriting the CIF file
//     rebuilds it and nothing else does.
//  2. Geometry: g and the beam direction as Cartesian vectors, the image
//     frame (x along g, z along the beam, y = z × x), and the displacement
//     fields of the defects in that frame. Its key is the material, g, the
//     beam and the defects.
//  3. Conditions: the wavelength, the extinction distance ξ_g (computed
//     from the structure factor, or the scene's extinction_nm), the
//     excitation error s and w = s ξ_g from whichever deviation form the
//     scene uses, the model with its absorption, the foil (thickness,
//     normal, the check that cavities lie inside it) and the image grid.
//     It runs on every build and is cheap.
//
// Changing the thickness, s, w or the model therefore re-runs the last
// stage only (TestBuilderStages counts the runs; BenchmarkRebuildSOnly and
// BenchmarkRebuildThicknessOnly against their OneShot twins give the
// cost). Every derived number — s from w, from g(ng) or from a Kikuchi
// line, ξ_g, the absorption lengths — is computed here, once, and read
// from the Setup everywhere else; Setup.DeviationAs writes the setup's s
// in another deviation form for a front that switches forms.
//
// # Conventions
//
// The deviation: s from w is w/ξ_g; the weak-beam condition g(ng) puts n·g
// at the Bragg position, s_g = (n − 1) λ g²/2 (Cockayne, Ray & Whelan 1969);
// a Kikuchi line at offset Δx beyond the g spot, with the 000–g spacing x,
// gives s = λ g² Δx/x (Hirsch et al. 1965, ch. 4).
//
// Absorption: ξ'_g = ξ_g / absorption_ratio (default 0.1, common practice),
// and the mean absorption ξ'_0 = ξ'_g of the imaged g in every model
// (Setup.Xi0AbsNm), the two-beam convention of Hirsch et al. (1965).
package scene
