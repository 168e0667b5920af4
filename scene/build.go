package scene

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/crystal"
	"faultline/defects"
	"faultline/sim"
)

// Setup is a scene turned into what the simulator and the figures need:
// the crystal, the imaging condition in numbers, and the sim.Problem in the
// image frame.
type Setup struct {
	Scene   *Scene
	Crystal *crystal.Crystal

	VoltageKV    float64
	WavelengthNm float64
	G            [3]float64 // g as three-index hkl
	Beam         [3]float64 // beam direction as three-index uvw
	GPerNm       float64    // |g|
	DSpacingNm   float64
	XiGNm        float64 // extinction distance used
	XiGComputed  bool    // false when extinction_nm overrides it
	SPerNm       float64 // excitation error of g
	W            float64 // s ξ_g
	Absorption   float64 // ξ_g/ξ'_g used (0 for the kinematical model)
	// XiGAbsNm is the absorption length ξ'_g = ξ_g/ratio of the imaged g
	// and Xi0AbsNm the mean absorption length ξ'_0, which is ξ'_g in
	// every model (+Inf with no absorption).
	XiGAbsNm, Xi0AbsNm float64
	Model              string
	// Row lists the beams of the systematic row, −N…N, for that model
	// (nil for the others).
	Row []RowBeam
	// TiltOffZoneDeg is the beam's rotation about g off the zone axis.
	TiltOffZoneDeg float64

	// Rotation takes crystal Cartesian vectors into the frame of g:
	// row 0 is x (along g), row 1 is y = z × x, row 2 is z (the beam).
	// The defects are built in it.
	Rotation [3][3]float64
	// GAngleDeg is the direction of g in the picture, counter-clockwise
	// from +x as displayed: 0 (g points right) unless image.x_axis fixes
	// the picture to the specimen, in which case Problem renders the
	// frame of g turned by this angle (sim.Turn).
	GAngleDeg float64

	Problem *sim.Problem
	// Notes records defaults applied and values derived (a dissociation
	// width from a stacking-fault energy), for display.
	Notes []string
	// Warnings records conditions a user should reconsider, for display:
	// a weak-beam condition weaker than common practice, strongly excited
	// reflections the model leaves out, defects that cannot show, an
	// opaque foil, residual contrast at g·b = 0 (see warnSpecimen).
	Warnings []string

	stroh   *defects.StrohCache // the material's, for the defects
	spheres []sphere            // cavities found while building defects
	fields  defects.Sum         // one field per defect, in the frame of g
	normalG r3.Vec              // the foil normal in the frame of g (zero: the beam)
	zones   *zoneCache          // the zone's reflections, from the geometry stage
}

// Build turns a validated scene into a Setup in one pass. dir is the
// directory that relative paths in the scene (a CIF file) are relative to.
// It is a Builder used once; to rebuild a scene after small changes, keep a
// Builder.
func Build(sc *Scene, dir string) (*Setup, error) {
	return new(Builder).Build(sc, dir)
}

// Builder compiles scenes in three stages and keeps the result of each
// for the next build, so a rebuild after a small change re-runs only the
// stages that change touches (see the package documentation):
//
//   - material: the crystal (a preset, a CIF file or an explicit cell) with
//     its elastic constants, and a cache of the Stroh solutions of its
//     dislocations per line direction. Reused while the crystal section and
//     the bytes of the CIF file it names are the same.
//   - geometry: g and the beam as vectors, the image frame, and the
//     displacement fields of the defects in it. Reused while the material,
//     g, the beam and the defects are the same.
//   - conditions: wavelength, ξ_g, the deviation s and w, the model with its
//     absorption, the foil and the image grid. Run on every build; it is
//     cheap.
//
// A Builder is safe for concurrent use; builds are serialised. The zero
// value is ready to use.
type Builder struct {
	mu     sync.Mutex
	mat    *material
	geo    *geometry
	counts Counts
}

// Counts tells how many times each stage of a Builder has run, and how
// many Stroh eigenproblems its material stages have solved.
type Counts struct {
	Material, Geometry, Conditions int
	StrohSolves                    int
}

// Counts returns the stage counts so far.
func (b *Builder) Counts() Counts {
	b.mu.Lock()
	defer b.mu.Unlock()
	c := b.counts
	if b.mat != nil {
		c.StrohSolves += b.mat.stroh.Solves()
	}
	return c
}

// material is the first stage.
type material struct {
	key     string
	crystal *crystal.Crystal
	stroh   *defects.StrohCache
}

// geometry is the second stage.
type geometry struct {
	key      string
	mat      *material
	g, beam  [3]float64
	gPerNm   float64
	rotation [3][3]float64
	field    defects.Sum
	zones    *zoneCache // the zone's reflections and their structure factors
	// gAngle is the angle of g in the picture (radians, counter-clockwise
	// as displayed): 0 unless image.x_axis fixes the picture to the
	// specimen.
	gAngle  float64
	spheres []sphere // cavities, checked against the foil by the last stage
	notes   []string
}

// sphere is a cavity, which must lie inside the foil.
type sphere struct {
	path   string
	at     r3.Vec
	radius float64
}

// Build turns a validated scene into a Setup, reusing the stages of the
// previous build that the scene's changes leave alone. dir is the
// directory that relative paths in the scene are relative to.
func (b *Builder) Build(sc *Scene, dir string) (*Setup, error) {
	if err := sc.Validate(); err != nil {
		return nil, err
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	mat, err := b.material(&sc.Crystal, dir)
	if err != nil {
		return nil, err
	}
	geo, err := b.geometry(sc, mat)
	if err != nil {
		return nil, err
	}
	b.counts.Conditions++
	return conditions(sc, geo)
}

// material returns the material stage of c, from the cache when the
// crystal section and the CIF file's bytes are unchanged.
func (b *Builder) material(c *Crystal, dir string) (*material, error) {
	section, err := json.Marshal(c)
	if err != nil {
		return nil, fieldErr("crystal", "%v", err)
	}
	key := string(section)
	var cif []byte
	cifPath := ""
	if c.CIF != "" {
		cifPath = c.CIF
		if !filepath.IsAbs(cifPath) {
			cifPath = filepath.Join(dir, cifPath)
		}
		if cif, err = readCIF(cifPath); err != nil {
			return nil, wrapErr("crystal.cif", err)
		}
		sum := sha256.Sum256(cif)
		key += "|" + cifPath + "|" + hex.EncodeToString(sum[:])
	}
	if b.mat != nil && b.mat.key == key {
		return b.mat, nil
	}
	cr, err := buildCrystal(c, cifPath, cif)
	if err != nil {
		return nil, err
	}
	b.counts.Material++
	if b.mat != nil {
		b.counts.StrohSolves += b.mat.stroh.Solves()
	}
	b.mat = &material{key: key, crystal: cr, stroh: defects.NewStrohCache()}
	b.geo = nil
	return b.mat, nil
}

// geometry returns the geometry stage of sc, from the cache when the
// material, g, the beam and the defects are unchanged.
func (b *Builder) geometry(sc *Scene, mat *material) (*geometry, error) {
	k, err := json.Marshal(struct {
		G, Beam, XAxis []float64
		Defects        []Defect
	}{sc.Diffraction.G, sc.Diffraction.Beam, sc.Image.XAxis, sc.Defects})
	if err != nil {
		return nil, fieldErr("defects", "%v", err)
	}
	key := string(k)
	if b.geo != nil && b.geo.mat == mat && b.geo.key == key {
		return b.geo, nil
	}
	geo := &geometry{key: key, mat: mat}
	cell := mat.crystal.Cell
	d := &sc.Diffraction
	if geo.g, err = cell.PlaneIndices(d.G); err != nil {
		return nil, wrapErr("diffraction.g", err)
	}
	if geo.beam, err = cell.DirectionIndices(d.Beam); err != nil {
		return nil, wrapErr("diffraction.beam", err)
	}
	gc := cell.Reciprocal(geo.g)
	bc := cell.Direction(geo.beam)
	geo.gPerNm = r3.Norm(gc)
	if dot := geo.g[0]*geo.beam[0] + geo.g[1]*geo.beam[1] + geo.g[2]*geo.beam[2]; math.Abs(dot) > 1e-9*(1+math.Abs(dot)) {
		return nil, fieldErr("diffraction.g", "%s is not perpendicular to the beam %s (g·B = %g)", fmtIdx(d.G), fmtIdx(d.Beam), dot)
	}
	x := r3.Unit(gc)
	z := r3.Unit(bc)
	y := r3.Cross(z, x)
	geo.rotation = [3][3]float64{{x.X, x.Y, x.Z}, {y.X, y.Y, y.Z}, {z.X, z.Y, z.Z}}
	inG := sc // the scene with its positions in the frame of g
	if len(sc.Image.XAxis) > 0 {
		if inG, err = geo.specimenFrame(sc, cell); err != nil {
			return nil, err
		}
	}
	if len(sc.Defects) > 0 {
		// The defects are built against a Setup that holds only what
		// they need: the crystal, its Stroh cache and the frame.
		st := &Setup{Scene: inG, Crystal: mat.crystal, G: geo.g, Beam: geo.beam, Rotation: geo.rotation, stroh: mat.stroh}
		if geo.field, err = st.buildDefects(); err != nil {
			return nil, err
		}
		geo.spheres, geo.notes = st.spheres, st.Notes
	}
	geo.zones = newZoneCache(mat.crystal, geo.beam)
	b.counts.Geometry++
	b.geo = geo
	return geo, nil
}

// specimenFrame sets the angle of g in a picture fixed to the specimen by
// image.x_axis and returns a copy of sc with every defect position turned
// from that frame into the frame of g (x along g), where the defects are
// built. With φ the angle of g counter-clockwise from the picture's +x as
// displayed, the specimen point (X, Y) lies at x = X cos φ − Y sin φ,
// y = X sin φ + Y cos φ in the frame of g (the turn of sim.Turn).
func (geo *geometry) specimenFrame(sc *Scene, cell crystal.Cell) (*Scene, error) {
	uvw, err := cell.DirectionIndices(sc.Image.XAxis)
	if err != nil {
		return nil, wrapErr("image.x_axis", err)
	}
	st := &Setup{Rotation: geo.rotation}
	xs := st.rotate(cell.Direction(uvw))
	if n := r3.Norm(xs); math.Abs(xs.Z) > 1e-6*n {
		return nil, fieldErr("image.x_axis", "%s is not perpendicular to the beam %s (it is %.2f° out of the picture's plane)", fmtIdx(sc.Image.XAxis), fmtIdx(sc.Diffraction.Beam), math.Asin(math.Min(1, math.Abs(xs.Z)/n))*180/math.Pi)
	}
	phi := math.Atan2(xs.Y, xs.X)
	geo.gAngle = phi
	c, s := math.Cos(phi), math.Sin(phi)
	out := *sc
	out.Defects = make([]Defect, len(sc.Defects))
	for i, d := range sc.Defects {
		if len(d.AtNm) == 3 {
			X, Y := d.AtNm[0], d.AtNm[1]
			d.AtNm = []float64{X*c - Y*s, X*s + Y*c, d.AtNm[2]}
		}
		out.Defects[i] = d
	}
	return &out, nil
}

// conditions is the last stage: everything that depends on the voltage,
// the deviation, the model, the foil and the image grid.
func conditions(sc *Scene, geo *geometry) (*Setup, error) {
	cr := geo.mat.crystal
	cell := cr.Cell
	st := &Setup{
		Scene:     sc,
		Crystal:   cr,
		VoltageKV: sc.Microscope.VoltageKV,
		G:         geo.g,
		Beam:      geo.beam,
		GPerNm:    geo.gPerNm,
		Rotation:  geo.rotation,
		stroh:     geo.mat.stroh,
	}
	st.DSpacingNm = 1 / st.GPerNm
	st.WavelengthNm = crystal.Wavelength(st.VoltageKV)
	d := &sc.Diffraction
	if 2*math.Asin(math.Min(1, st.WavelengthNm*st.GPerNm/2)) > math.Pi/6 {
		return nil, fieldErr("diffraction.g", "%s: Bragg angle too large for the column approximation at %g kV", fmtIdx(d.G), st.VoltageKV)
	}

	// Extinction distance and deviation.
	if d.ExtinctionNm != nil {
		st.XiGNm = *d.ExtinctionNm
	} else {
		xi, err := cr.ExtinctionDistance(st.G, st.VoltageKV)
		if err != nil {
			if errors.Is(err, crystal.ErrForbidden) {
				return nil, &FieldError{Path: "diffraction.g", Msg: fmt.Sprintf("%s is kinematically forbidden in %s; give diffraction.extinction_nm to image it anyway", fmtIdx(d.G), cr.Name), Err: err}
			}
			return nil, wrapErr("diffraction.g", err)
		}
		st.XiGNm = xi
		st.XiGComputed = true
	}
	switch {
	case d.SPerNm != nil:
		st.SPerNm = *d.SPerNm
	case d.W != nil:
		st.SPerNm = *d.W / st.XiGNm
	case d.WeakBeam != nil:
		// s_g = (n − 1) λ g²/2 puts n·g at the Bragg position (the g(ng)
		// weak-beam condition; Cockayne, Ray & Whelan 1969).
		st.SPerNm = (d.WeakBeam.N - 1) * st.WavelengthNm * st.GPerNm * st.GPerNm / 2
		st.Notes = append(st.Notes, fmt.Sprintf("weak beam g(%gg): s_g = %.4f /nm puts %g·g at the Bragg position", d.WeakBeam.N, st.SPerNm, d.WeakBeam.N))
	case d.Kikuchi != nil:
		s, err := crystal.DeviationFromKikuchi(st.WavelengthNm, st.GPerNm, d.Kikuchi.Offset, d.Kikuchi.Spacing)
		if err != nil {
			return nil, wrapErr("diffraction.deviation_from_kikuchi", err)
		}
		st.SPerNm = s
	}
	st.W = st.SPerNm * st.XiGNm
	switch {
	case d.W != nil:
		if err := checkDerivedS("diffraction.w", st.SPerNm, fmt.Sprintf("w = %g with ξ_g = %.4g nm", *d.W, st.XiGNm)); err != nil {
			return nil, err
		}
	case d.WeakBeam != nil:
		if err := checkDerivedS("diffraction.weak_beam.n", st.SPerNm, fmt.Sprintf("g(%gg) with |g| = %.4g /nm at %g kV", d.WeakBeam.N, st.GPerNm, st.VoltageKV)); err != nil {
			return nil, err
		}
	case d.Kikuchi != nil:
		if err := checkDerivedS("diffraction.deviation_from_kikuchi.offset", st.SPerNm, fmt.Sprintf("offset %g over spacing %g", d.Kikuchi.Offset, d.Kikuchi.Spacing)); err != nil {
			return nil, err
		}
	}

	ratio := DefaultAbsorptionRatio
	if d.AbsorptionRatio != nil {
		ratio = *d.AbsorptionRatio
	} else if d.Model != "kinematical" {
		st.Notes = append(st.Notes, fmt.Sprintf("absorption ratio ξ_g/ξ'_g = %g (default)", ratio))
	}
	st.Model = d.Model
	if st.Model == "" {
		st.Model = DefaultModel
		if d.WeakBeam != nil {
			// A weak-beam image needs the rest of the systematic row.
			st.Model = "systematic-row"
		}
	}
	if d.WeakBeam != nil && st.Model != "systematic-row" {
		st.Notes = append(st.Notes, fmt.Sprintf("weak beam with the %s model: computed with g alone, the rest of the systematic row left out", st.Model))
	}
	if d.TiltOffZoneDeg != nil {
		st.TiltOffZoneDeg = *d.TiltOffZoneDeg
	}
	// Mean absorption: ξ'_0 = ξ'_g of the imaged g, the one convention of
	// every model (see the package documentation).
	st.XiGAbsNm, st.Xi0AbsNm = math.Inf(1), math.Inf(1)
	if ratio > 0 && st.Model != "kinematical" {
		st.XiGAbsNm = st.XiGNm / ratio
		st.Xi0AbsNm = st.XiGAbsNm
	}
	if err := checkOpacity(sc.Foil.ThicknessNm, st.Xi0AbsNm); err != nil {
		return nil, err
	}
	var model sim.Model
	switch st.Model {
	case "kinematical":
		model = sim.Kinematical{SPerNm: st.SPerNm, XiGNm: st.XiGNm}
	case "two-beam":
		tb := sim.TwoBeam{SPerNm: st.SPerNm, XiGNm: st.XiGNm}
		if ratio > 0 {
			tb.XiGAbsNm, tb.Xi0AbsNm = st.XiGAbsNm, st.Xi0AbsNm
		}
		st.Absorption = ratio
		model = tb
	case "systematic-row":
		beams := rowBeams(d)
		row, err := st.rowModel(beams, ratio)
		if err != nil {
			return nil, err
		}
		if d.Beams == 0 {
			st.Notes = append(st.Notes, fmt.Sprintf("systematic row of %d beams, %d·g to %d·g (default)", beams, -beams/2, beams/2))
		}
		st.Absorption = ratio
		model = row
	}

	// Foil.
	normal := r3.Vec{}
	if len(sc.Foil.Normal) > 0 {
		uvw, err := cell.DirectionIndices(sc.Foil.Normal)
		if err != nil {
			return nil, wrapErr("foil.normal", err)
		}
		n := r3.Unit(st.rotate(cell.Direction(uvw)))
		if n.Z < 0 {
			n = r3.Scale(-1, n) // the same surfaces; point it into the foil
		}
		if n.Z < math.Cos(80*math.Pi/180) {
			return nil, fieldErr("foil.normal", "%s is %.0f° from the beam; the foil must be tilted less than 80°", fmtIdx(sc.Foil.Normal), math.Acos(n.Z)*180/math.Pi)
		}
		normal = n
	}
	for _, c := range geo.spheres {
		if err := insideFoil(c, normal, sc.Foil.ThicknessNm); err != nil {
			return nil, err
		}
	}
	st.Notes = append(st.Notes, geo.notes...)

	st.Problem = &sim.Problem{
		Model:       model,
		GPerNm:      st.GPerNm,
		ThicknessNm: sc.Foil.ThicknessNm,
		Normal:      normal,
		Grid: sim.Grid{NX: sc.Image.Pixels[0], NY: sc.Image.Pixels[1],
			WidthNm: sc.Image.WidthNm, HeightNm: sc.Image.HeightNm},
	}
	st.fields, st.normalG, st.zones = geo.field, normal, geo.zones
	if len(geo.field) > 0 {
		st.Problem.Field = geo.field
	}
	if len(sc.Image.XAxis) > 0 {
		// The picture is fixed to the specimen: its raster is turned so
		// that g points at its angle.
		st.GAngleDeg = geo.gAngle * 180 / math.Pi
		st.Problem = sim.Turn(st.Problem, geo.gAngle, st.Problem.Grid)
	}
	st.warnConditions()
	st.warnSpecimen()
	if err := st.Problem.Validate(); err != nil {
		// Everything the problem holds was checked above except what the
		// crystal produced: the extinction distance and the model built
		// from it.
		return nil, fieldErr("diffraction", "%v (from the crystal's structure factor; check its atoms or give extinction_nm)", err)
	}
	return st, nil
}

// rotate takes a crystal Cartesian vector into the image frame.
func (st *Setup) rotate(v r3.Vec) r3.Vec {
	r := st.Rotation
	return r3.Vec{
		X: r[0][0]*v.X + r[0][1]*v.Y + r[0][2]*v.Z,
		Y: r[1][0]*v.X + r[1][1]*v.Y + r[1][2]*v.Z,
		Z: r[2][0]*v.X + r[2][1]*v.Y + r[2][2]*v.Z,
	}
}

// ImageVector returns the crystal direction uvw (three or four indices,
// scaled by factor) as a Cartesian vector in nm in the image frame.
func (st *Setup) ImageVector(uvw [3]float64) r3.Vec {
	return st.rotate(st.Crystal.Cell.Direction(uvw))
}

// buildCrystal makes the crystal of c; cif holds the bytes of the CIF file
// at cifPath when c names one.
func buildCrystal(c *Crystal, cifPath string, cif []byte) (*crystal.Crystal, error) {
	var (
		cr  *crystal.Crystal
		err error
	)
	switch {
	case c.Material != "":
		if cr, err = crystal.Preset(c.Material); err != nil {
			return nil, wrapErr("crystal.material", err)
		}
	case c.CIF != "":
		if cr, err = crystal.ParseCIF(bytes.NewReader(cif), ""); err != nil {
			return nil, wrapErr("crystal.cif", fmt.Errorf("%s: %w", cifPath, err))
		}
	default:
		k := c.Cell
		cell, err := crystal.NewCell(k.ANm, k.BNm, k.CNm, k.AlphaDeg, k.BetaDeg, k.GammaDeg)
		if err != nil {
			return nil, wrapErr("crystal.cell", err)
		}
		atoms := make([]crystal.Atom, len(c.Atoms))
		for i, a := range c.Atoms {
			atoms[i] = crystal.Atom{Element: a.Element, XYZ: a.XYZ, Occupancy: 1}
			if a.Occupancy != nil {
				atoms[i].Occupancy = *a.Occupancy
			}
			if a.BIsoNm2 != nil {
				atoms[i].BIsoNm2 = *a.BIsoNm2
			}
		}
		if cr, err = crystal.New("explicit cell", cell, atoms, c.Symmetry, c.Centering); err != nil {
			return nil, wrapErr("crystal.atoms", err)
		}
	}
	if e := c.Elastic; e != nil {
		el, err := elastic(e, cr.Cell)
		if err != nil {
			return nil, wrapErr("crystal.elastic", err)
		}
		if cr, err = cr.WithElastic(el); err != nil {
			return nil, wrapErr("crystal.elastic", err)
		}
	}
	return cr, nil
}

func elastic(e *Elastic, cell crystal.Cell) (crystal.Elastic, error) {
	v := func(p *float64) float64 {
		if p == nil {
			return math.NaN()
		}
		return *p
	}
	switch {
	case e.ShearGPa != nil:
		return crystal.IsotropicElastic(*e.ShearGPa, *e.Poisson)
	case e.Cij != nil:
		if e.C11 != nil || e.C12 != nil || e.C13 != nil || e.C33 != nil || e.C44 != nil {
			return crystal.Elastic{}, errors.New("give cij or the named constants, not both")
		}
		return crystal.FullElastic(*e.Cij)
	case e.C13 != nil || e.C33 != nil:
		if e.C11 == nil || e.C12 == nil || e.C13 == nil || e.C33 == nil || e.C44 == nil {
			return crystal.Elastic{}, errors.New("hexagonal constants need c11, c12, c13, c33 and c44")
		}
		return crystal.HexagonalElastic(v(e.C11), v(e.C12), v(e.C13), v(e.C33), v(e.C44))
	default:
		if e.C11 == nil || e.C12 == nil || e.C44 == nil {
			return crystal.Elastic{}, errors.New("cubic constants need c11, c12 and c44")
		}
		if cell.IsHexagonal() {
			return crystal.Elastic{}, errors.New("a hexagonal cell needs c11, c12, c13, c33 and c44")
		}
		return crystal.CubicElastic(v(e.C11), v(e.C12), v(e.C44))
	}
}

// fmtPlane writes plane indices as the trade does: (1 -1 1).
func fmtPlane(v []float64) string {
	t := fmtIdx(v)
	return "(" + t[1:len(t)-1] + ")"
}

// fmtIdx writes direction indices as the trade does: [1 -1 0].
func fmtIdx(v []float64) string { return "[" + crystal.FormatIndices(v) + "]" }

// medium is the elastic description of the crystal in the image frame.
func (st *Setup) medium() defects.Medium {
	e := st.Crystal.Elastic
	m := defects.Medium{ShearGPa: e.ShearGPa, Poisson: e.Poisson, Stroh: st.stroh}
	if e.Full {
		c := defects.RotateStiffness(e.C, st.Rotation)
		m.C = &c
	}
	return m
}

// defectErr names the defect field a lower-layer error is about.
func defectErr(path string, err error) error {
	var ie *defects.InputError
	if errors.As(err, &ie) {
		return &FieldError{Path: path + "." + ie.Field, Msg: ie.Problem, Err: err}
	}
	return wrapErr(path, err)
}

// readCIF reads the CIF file at path, at most crystal.MaxCIFBytes of it
// (a device such as /dev/zero, or a huge file, is refused, not read whole).
func readCIF(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, crystal.MaxCIFBytes+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(data) > crystal.MaxCIFBytes {
		return nil, fmt.Errorf("%s: larger than %d MB", path, crystal.MaxCIFBytes>>20)
	}
	return data, nil
}
