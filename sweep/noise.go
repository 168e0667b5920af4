package sweep

import (
	"math/rand/v2"

	"gonum.org/v1/gonum/stat/distuv"

	"faultline/sim"
)

// addNoise applies the sweep's noise to job k's image, in the order a
// detector sees it: the Gaussian blur of the optics and detector
// (sim.Blur, standard deviation blur_nm), then shot noise. Shot noise at a
// dose of D electrons per pixel makes each pixel's count Poisson with mean
// D·I (I the intensity as a fraction of the incident beam), and the image
// records count/D, so the mean is unchanged and the relative noise is
// 1/sqrt(D·I). The generator is seeded by JobSeed(seed, k, "noise"), so a
// job's noise does not depend on which shard or worker ran it.
func (sw *Sweep) addNoise(im *sim.Image, k int) error {
	n := sw.File.Noise
	if n == nil {
		return nil
	}
	if n.BlurNm != nil && *n.BlurNm > 0 {
		sim.Blur(im, *n.BlurNm)
	}
	if n.DoseEPerPx == nil {
		return nil
	}
	dose := *n.DoseEPerPx
	src := rand.NewPCG(JobSeed(*sw.File.Seed, k, "noise"))
	for _, plane := range im.Intensity {
		for i, v := range plane {
			mean := dose * max(v, 0)
			if mean == 0 {
				plane[i] = 0
				continue
			}
			plane[i] = distuv.Poisson{Lambda: mean, Src: src}.Rand() / dose
		}
	}
	return nil
}
