// Package plan helps choose the imaging conditions before going to the
// microscope: for a scene it computes the thickness fringes and the
// rocking curve of the perfect crystal, the visibility of the scene's
// defects over a grid of thickness and excitation error, the weak-beam
// image peak of a dislocation against s (position from the core and
// width), the apparent separation of a dissociated dislocation's partials
// in weak beam against the true one, and the g·b, g·(b×u) table of
// candidate Burgers-vector families against the zone's low-order
// reflections; it suggests conditions, with the reason for each.
//
// # Definitions
//
// Visibility of a defect at (t, s) is the Michelson contrast of the dark
// field along a profile across the defect (perpendicular to a dislocation's
// projected line, through its middle; along x through the centre of any
// other defect):
//
//	V = (I_max − I_min) / (I_max + I_min)
//
// which is 0 for a featureless image and approaches 1 where the defect
// makes the intensity vanish somewhere or rise far above the background.
//
// The weak-beam image of a dislocation, and of each partial of a
// dissociated one, is sought by one rule (imagePeak): the highest maximum
// of the dark field along that profile on the side of the core where
// s + g·dR/dz = 0, within 2.5 times the distance at which that happens on
// the column through the core, rising above the perfect crystal's dark
// field by at least 5 % of the highest rise within the sought reach of
// the cores. Where there is none the peak is not found (NaN); a value at
// the edge of the profile is never taken. Its position is measured from
// the core along the profile (from the ribbon's middle for a dissociated
// dislocation, whose stronger partial image stands for the pair's) and its
// width is the full width at half its height above the background,
// crossings interpolated between samples; NaN where the half height is
// not reached inside the profile, which extends 4 nm beyond the farthest
// point sought (at least ±12 nm, a column every 0.15 nm). The image of
// each partial of a dissociated
// dislocation lies off its core towards the side where s + g·dR/dz = 0,
// near the distance g·b_p/(2π s) at which that happens on the column
// through the core's depth (Cockayne, Ray & Whelan 1969, Phil. Mag. 20,
// 1265; the computed peak lies at 0.3–0.9 of it, and with many beams the
// highest maximum sometimes beyond it, depending on g·b, the beams, the
// thickness and the depth), so the separation of the two
// peaks differs from the partials' projected separation. Each partial's
// image is the highest maximum above the background within 2.5 times that
// distance (plus a pixel) of its core (with the systematic row the highest
// maximum can lie beyond the distance itself: reachFactor); where one
// partial has none, or both take the same maximum, the pair is reported
// unresolved. The ratio the planner
// reports, projected over measured, is the correction to apply to a
// measured width: the Cockayne–Ray–Whelan correction (so named, and
// re-examined against image simulations, by Hemker 1997, Phil. Mag. A 76,
// 241), applied to measure the partials' separation in Cu and Ag by
// Cockayne, Jenkins & Ray 1971 (Phil. Mag. 24, 1383) and in Cu by Stobbs &
// Sworn 1971 (Phil. Mag. 24, 1365).
//
// # Reuse of the field samples
//
// The visibility grid and the weak-beam scan integrate the same columns at
// many (t, s): the columns' samples of the displacement field are recorded
// once (sim.Record, up to the largest thickness, with the step control
// covering the extreme excitation errors) and replayed for every point
// (sim.Samples.Replay), so the field is evaluated once per column rather
// than once per column per point. Plan.Reuse reports the measured times.
package plan
