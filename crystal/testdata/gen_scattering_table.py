# Regenerates ../scattering_table.go from python3-gemmi (Debian), the
# machine-readable copy of International Tables for Crystallography Vol. C
# (2004) Table 4.3.2.2 (Peng, Ren, Dudarev & Whelan 1996, Acta Cryst. A52, 257).
# Run from crystal/:  /usr/bin/python3 testdata/gen_scattering_table.py && gofmt -w scattering_table.go
import gemmi

head = '''// Code generated from python3-gemmi %s (gemmi.Element(z).c4322) by testdata/gen_scattering_table.py; DO NOT EDIT.

package crystal

// peng1996 holds the five-Gaussian fits to the elastic electron scattering
// factors of the neutral atoms, Z = 1–98:
//
//	f(s) = Σ_{i=1..5} a_i exp(−b_i s²),  s = sinθ/λ in 1/Å, f in Å,
//
// valid for 0 ≤ s ≤ 2 1/Å.
//
// Source: International Tables for Crystallography Vol. C (2004),
// Table 4.3.2.2; Peng, Ren, Dudarev & Whelan (1996), Acta Cryst. A52, 257–276.
// Transcribed from the machine-readable copy in python3-gemmi (Debian),
// attribute gemmi.Element(z).c4322 (fields a and b).
// TestScatteringTableMatchesGemmi compares every entry with that copy.
var peng1996 = [...]gaussianFit{
	{}, // Z = 0 unused
''' % gemmi.__version__
rows = []
for z in range(1, 99):
    e = gemmi.Element(z)
    c = e.c4322
    fa = lambda v: '{' + ', '.join(repr(x) for x in v) + '}'
    rows.append('\t{Symbol: "%s", A: [5]float64%s, B: [5]float64%s}, // Z = %d\n'
                % (e.name, fa(c.a), fa(c.b), z))
open('scattering_table.go', 'w').write(head + ''.join(rows) + '}\n')
