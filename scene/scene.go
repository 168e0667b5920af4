package scene

// Version is the scene-file version this package reads and writes.
const Version = 1

// Scene is scene file v1. Optional values are pointers or empty slices so
// that a field left out is told apart from a field set to zero, and a saved
// scene holds exactly what was loaded.
type Scene struct {
	Version     int         `json:"version"`
	Crystal     Crystal     `json:"crystal"`
	Microscope  Microscope  `json:"microscope"`
	Diffraction Diffraction `json:"diffraction"`
	Foil        Foil        `json:"foil"`
	Defects     []Defect    `json:"defects"`
	Image       Image       `json:"image"`
}

// Crystal names the crystal: a built-in material, a CIF file, or an
// explicit cell with atoms.
type Crystal struct {
	Material  string   `json:"material,omitempty"`
	CIF       string   `json:"cif,omitempty"`
	Cell      *Cell    `json:"cell,omitempty"`
	Atoms     []Atom   `json:"atoms,omitempty"`
	Symmetry  []string `json:"symmetry,omitempty"`
	Centering string   `json:"centering,omitempty"`
	Elastic   *Elastic `json:"elastic,omitempty"`
}

// Cell is a unit cell: lengths in nm, angles in degrees.
type Cell struct {
	ANm      float64 `json:"a_nm"`
	BNm      float64 `json:"b_nm"`
	CNm      float64 `json:"c_nm"`
	AlphaDeg float64 `json:"alpha_deg"`
	BetaDeg  float64 `json:"beta_deg"`
	GammaDeg float64 `json:"gamma_deg"`
}

// Atom is one site of an explicit cell.
type Atom struct {
	Element   string     `json:"element"`
	XYZ       [3]float64 `json:"xyz"`
	Occupancy *float64   `json:"occupancy,omitempty"`
	BIsoNm2   *float64   `json:"b_iso_nm2,omitempty"`
}

// Elastic holds elastic constants in GPa: cubic {c11, c12, c44},
// hexagonal {c11, c12, c13, c33, c44}, a full 6×6 {cij}, or an isotropic
// medium {shear_gpa, poisson}.
type Elastic struct {
	C11      *float64       `json:"c11,omitempty"`
	C12      *float64       `json:"c12,omitempty"`
	C13      *float64       `json:"c13,omitempty"`
	C33      *float64       `json:"c33,omitempty"`
	C44      *float64       `json:"c44,omitempty"`
	Cij      *[6][6]float64 `json:"cij,omitempty"`
	ShearGPa *float64       `json:"shear_gpa,omitempty"`
	Poisson  *float64       `json:"poisson,omitempty"`
}

// Microscope holds the accelerating voltage.
type Microscope struct {
	VoltageKV float64 `json:"voltage_kv"`
}

// Diffraction is the imaging condition.
type Diffraction struct {
	G    []float64 `json:"g"`
	Beam []float64 `json:"beam"`
	// Exactly one of SPerNm, W, WeakBeam and Kikuchi.
	SPerNm   *float64  `json:"s_per_nm,omitempty"`
	W        *float64  `json:"w,omitempty"`
	WeakBeam *WeakBeam `json:"weak_beam,omitempty"`
	Kikuchi  *Kikuchi  `json:"deviation_from_kikuchi,omitempty"`
	// Model is "kinematical", "two-beam" or "systematic-row"; left out it
	// is two-beam, or the systematic row for a weak_beam condition.
	Model string `json:"model,omitempty"`
	// Beams is the number of beams of the systematic row, odd, 3 to 15
	// (−N…N); left out, 7 (or enough to hold the weak beam's n·g).
	Beams           int      `json:"beams,omitempty"`
	ExtinctionNm    *float64 `json:"extinction_nm,omitempty"`
	AbsorptionRatio *float64 `json:"absorption_ratio,omitempty"`
	// TiltOffZoneDeg is the beam's rotation about g away from the zone
	// axis, in degrees (−90, 90): it leaves the systematic row's excitation
	// errors alone and moves the other reflections of the zone off Bragg.
	TiltOffZoneDeg *float64 `json:"tilt_off_zone_deg,omitempty"`
}

// WeakBeam sets the g(ng) condition: the reflection n·g is at the Bragg
// position while the image is formed with g. n is a whole number other
// than 0 and 1; negative n (g(−g), g(−2g)) tilts the other way.
type WeakBeam struct {
	N float64 `json:"n"`
}

// Kikuchi gives the deviation as measured on a diffraction pattern: the
// offset of the excess Kikuchi line from the g spot and the spacing of the
// 000 and g spots, in any common unit.
type Kikuchi struct {
	Offset  float64 `json:"offset"`
	Spacing float64 `json:"spacing"`
}

// Foil is the specimen slab.
type Foil struct {
	ThicknessNm float64   `json:"thickness_nm"`
	Normal      []float64 `json:"normal,omitempty"`
}

// Defect is one defect. Type selects which of the other fields apply; a
// field that does not belong to the type is an error.
type Defect struct {
	Type         string    `json:"type"`
	B            string    `json:"b,omitempty"`
	Line         []float64 `json:"line,omitempty"`
	AtNm         []float64 `json:"at_nm,omitempty"`
	Plane        []float64 `json:"plane,omitempty"`
	Partials     []string  `json:"partials,omitempty"`
	SeparationNm *float64  `json:"separation_nm,omitempty"`
	SFEmJm2      *float64  `json:"sfe_mj_m2,omitempty"`
	Shift        string    `json:"shift,omitempty"`
	RadiusNm     *float64  `json:"radius_nm,omitempty"`
	Strain       *float64  `json:"strain,omitempty"`
	Misfit       *float64  `json:"misfit,omitempty"`
	Normal       []float64 `json:"normal,omitempty"`
	Elasticity   string    `json:"elasticity,omitempty"`
	// Kind names a fault instead of its shift: "intrinsic" or
	// "extrinsic" on a {111} plane of a cubic crystal, "I1", "I2" or "E"
	// on the basal plane of a hexagonal one (see FaultKindShift).
	Kind string `json:"kind,omitempty"`
	// Nature, "vacancy" or "interstitial", fixes the sign of a loop's b
	// (b gives its direction and length): b·n > 0 for a vacancy loop.
	Nature string `json:"nature,omitempty"`
	// Edge and BoundsNm bound a fault to a strip of its plane: the
	// bounding lines run along the direction Edge [uvw], and the strip
	// spans the in-plane distances BoundsNm [from, to] from at_nm measured
	// along n × edge (n the plane normal).
	Edge     []float64 `json:"edge,omitempty"`
	BoundsNm []float64 `json:"bounds_nm,omitempty"`
}

// Image is the simulated field of view.
type Image struct {
	WidthNm  float64  `json:"width_nm"`
	HeightNm float64  `json:"height_nm"`
	Pixels   []int    `json:"pixels"`
	BlurNm   *float64 `json:"blur_nm,omitempty"`
	// XAxis fixes the picture to the specimen: a crystal direction [uvw]
	// perpendicular to the beam that points right in the picture. Positions
	// (at_nm) are then in that frame and g is drawn at its angle, so a g·b
	// series keeps its defects in place. Without it x lies along g.
	XAxis []float64 `json:"x_axis,omitempty"`
}
