package ui

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"
)

// aboutModels is the Help page on the models: what each assumes, the
// conventions of every sign, and the cautions. It says in short what the
// README's "Conventions", "Cautions" and "How it computes" say in full.
const aboutModels = `# About the models

Every model works in the **column approximation**: each pixel is one column
of crystal along the beam, integrated on its own; the electrons in one
column do not feel the neighbouring columns. Displacements R(r) are those
of an infinite elastic medium (no surface relaxation).

## Kinematical

The amplitude–phase integral φg = (iπ/ξg) ∫ exp(−2πi(s z + g·R)) dz
(Hirsch et al. 1965, ch. 7). Single scattering only: valid when the
diffracted beam stays weak, |w| = |s ξg| well above 1. No absorption.
Near the Bragg condition (s ≈ 0) it overestimates the dark field.

## Two-beam

The Howie–Whelan equations with anomalous absorption (Howie & Whelan 1961;
Hirsch et al. 1965, ch. 8): only the transmitted beam and g are excited.
Absorption: ξ'g = ξg / ratio (the field ξg / ξ'g, 0.1 by default as
common practice), and the mean absorption ξ'0 = ξ'g of the imaged g.
Valid when no other reflection is strongly excited: the status line warns
when one is, and says how to tilt off the zone.

## Systematic row

N beams n·g (Darwin–Howie–Whelan), coupled by the Fourier coefficients of
(n − m)g, each with its absorptive part, the same mean absorption ξ'0 as
the two-beam model. Excitation errors sₙ = n s₁ + n(1 − n) λ g²/2, so a
weak-beam g(ng) has sg = (n − 1) λ g²/2. Use it for weak-beam images and
near s = 0 of a strong g; reflections outside the row are still left out.

## Conventions

- **Frame:** z along the beam, into the foil; the entrance surface (z = 0) is
  the top. x along g: g points right in every picture; y = z × x runs down
  the picture. With image.x\_axis the picture is fixed to the specimen and g
  is drawn at its angle.
- **s > 0** when the reciprocal-lattice point g lies inside the Ewald sphere:
  the excess Kikuchi line lies beyond the g spot.
- **b by FS/RH:** a right-handed circuit about the line sense u gains +b.
- **Loops:** the line sense is right-handed about the loop's normal n;
  b·n > 0 is a vacancy loop, b·n < 0 an interstitial loop.
- **Faults:** shift R moves the crystal on the side the plane normal points
  to; intrinsic removes a close-packed layer, extrinsic inserts one.
- **Inclusions:** misfit > 0 expands, < 0 contracts (Ashby & Brown 1963).

## Cautions

- A simulated image is a model, not a measurement: confirm an
  identification with several g and several s, and with the micrographs.
- Within about 1 nm of a dislocation core the elastic field, and so the
  image, is not meaningful.
- Loops are isotropic; straight dislocations are anisotropic (Stroh) where
  the crystal has full elastic constants.
- Grey: a stretched panel states the range it maps; a panel whose range is
  below 1e-3 of the incident beam has no contrast and is drawn flat.
`

// showAboutModels opens the page.
func (ws *Workspace) showAboutModels() {
	if ws.win == nil {
		return
	}
	text := widget.NewRichTextFromMarkdown(aboutModels)
	text.Wrapping = fyne.TextWrapWord
	scroll := container.NewVScroll(text)
	d := dialog.NewCustom("About the models", "Close", scroll, ws.win)
	d.Resize(fyne.NewSize(760, 640))
	d.Show()
}
