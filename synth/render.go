package synth

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sort"

	"whorl/acquire"
)

// pull is the kinematics of one probe pull: samples on a uniform grid of
// recorded (encoder) positions, the true position of the coils at each
// sample, and the time of each sample from a slowly varying speed.
type pull struct {
	n     int
	stepM float64
	zRec  []float64
	zTrue []float64
	timeS []float64
}

// newPull draws a pull over recorded positions 0 … lengthM. The encoder
// reads the true position times (1+s) plus a slow wiggle of amplitude up to
// wiggleM, with s uniform in ±scaleErr; the speed varies by up to
// ±SpeedVariation along the pull.
func (g *Generator) newPull(r *rand.Rand, lengthM, scaleErr, wiggleM float64) *pull {
	step := 1 / g.cfg.SamplesPerM
	n := int(math.Floor(lengthM/step+1e-9)) + 1
	p := &pull{n: n, stepM: step, zRec: make([]float64, n), zTrue: make([]float64, n), timeS: make([]float64, n)}
	s := scaleErr * (2*r.Float64() - 1)
	wig := wiggleM * r.Float64()
	wl := 0.5 + 1.5*r.Float64()
	wph := 2 * math.Pi * r.Float64()
	// Speed: two slow sinusoids in position with random wavelength and
	// phase, peak fractional variation SpeedVariation.
	a := g.cfg.SpeedVariation
	l1, l2 := 0.8+1.2*r.Float64(), 0.15+0.3*r.Float64()
	p1, p2 := 2*math.Pi*r.Float64(), 2*math.Pi*r.Float64()
	v0 := g.cfg.ProbeSpeedMPS
	speed := func(z float64) float64 {
		return v0 * (1 + a*(0.65*math.Sin(2*math.Pi*z/l1+p1)+0.35*math.Sin(2*math.Pi*z/l2+p2)))
	}
	prevV, tk := speed(0), 0.0
	for k := range n {
		z := float64(k) * step
		p.zRec[k] = math.Round(z*1e6) / 1e6 // the encoder reads whole micrometres
		p.zTrue[k] = z/(1+s) - wig*math.Sin(2*math.Pi*z/wl+wph) + wig*math.Sin(wph)
		if k > 0 {
			v := speed(z)
			tk += step * 0.5 * (1/prevV + 1/v) // trapezoid on dt = dz/v
			prevV = v
			p.timeS[k] = math.Round(tk*1e6) / 1e6 // the clock reads whole microseconds
		}
	}
	return p
}

// indexRange returns the samples whose true position lies in [lo, hi).
func (p *pull) indexRange(lo, hi float64) (int, int) {
	return sort.SearchFloat64s(p.zTrue, lo), sort.SearchFloat64s(p.zTrue, hi)
}

// noiseLevels are the disturbance amplitudes of one pull, in normalised
// volts.
type noiseLevels struct {
	whiteV  float64 // rms white noise on differential channels (absolute: 1.5×)
	pinkV   float64 // rms of each 1/f component
	driftV  float64 // absolute-channel drift over the pull (differential: 1/10)
	wobbleV float64 // rms probe wobble on absolute channels
}

// render adds the features, wobble, noise and drift of one pull and
// returns the channels as the instrument records them: gain·e^{j·rot}·
// conj(signal) + offset per channel (see the package documentation for
// why the conjugate).
func (g *Generator) render(p *pull, feats []feature, r *rand.Rand, lv noiseLevels, set []setting) []acquire.Channel {
	chans := g.Channels()
	for c := range chans {
		chans[c].Samples = make([]complex128, p.n)
	}
	h := g.cfg.CoilSpacingM / 2
	for i := range feats {
		f := &feats[i]
		for fi := range g.cfg.FreqsHz {
			resp := f.modelResponse(g, fi)
			s := f.sigma(g, fi)
			k0, k1 := p.indexRange(f.z1-6*s-h, f.z2+6*s+h)
			d, a := chans[2*fi].Samples, chans[2*fi+1].Samples
			for k := k0; k < k1; k++ {
				z := p.zTrue[k]
				d[k] += resp * complex(boxBlur(z-h, f.z1, f.z2, s)-boxBlur(z+h, f.z1, f.z2, s), 0)
				a[k] += resp * complex(boxBlur(z, f.z1, f.z2, s), 0)
			}
		}
	}
	g.addWobble(p, chans, r, lv.wobbleV)
	for c := range chans {
		abs := chans[c].Mode == acquire.Absolute
		white, drift := lv.whiteV, lv.driftV/10
		pinkL := []float64{0.005, 0.05}
		if abs {
			white, drift = 1.5*lv.whiteV, lv.driftV
			pinkL = []float64{0.005, 0.05, 0.5}
		}
		addNoise(chans[c].Samples, r, p.stepM, white, lv.pinkV, pinkL, drift)
		st := set[c]
		rot := complex(st.gain, 0) * cmplx.Rect(1, st.rotRad)
		for k, v := range chans[c].Samples {
			chans[c].Samples[k] = quantise(rot*cmplx.Conj(v)+st.offset, quantumV)
		}
	}
	return chans
}

// quantumV is the resolution of recorded scan samples, 1 mV: well below
// the noise (NoiseV times the instrument gain), and it keeps scan files
// compact because each value prints in a few digits.
const quantumV = 1e-3

// quantise rounds X and Y to the nearest multiple of q (q = 10^−k, so the
// result is the float64 nearest the decimal and prints as it).
func quantise(v complex128, q float64) complex128 {
	s := 1 / q
	return complex(math.Round(real(v)*s)/s, math.Round(imag(v)*s)/s)
}

// addWobble adds probe wobble, a smooth random change of the coil-to-wall
// gap (correlation length about 15 mm), in the lift-off direction: in full
// on the absolute channels, and as the difference of the two coils'
// views plus a 5 % coil imbalance on the differential channels.
func (g *Generator) addWobble(p *pull, chans []acquire.Channel, r *rand.Rand, rmsV float64) {
	if rmsV == 0 {
		return
	}
	w := make([]float64, p.n)
	a := math.Exp(-p.stepM / 0.015)
	b := math.Sqrt(1 - a*a)
	x1, x2 := r.NormFloat64(), r.NormFloat64()
	var ss float64
	for k := range w {
		x1 = a*x1 + b*r.NormFloat64()
		x2 = a*x2 + b*x1
		w[k] = x2
		ss += x2 * x2
	}
	scale := rmsV / math.Sqrt(ss/float64(p.n)+1e-300)
	for k := range w {
		w[k] *= scale
	}
	shift := g.cfg.CoilSpacingM / 2 / p.stepM
	at := func(x float64) float64 { // linear interpolation, clamped
		if x <= 0 {
			return w[0]
		}
		if x >= float64(p.n-1) {
			return w[p.n-1]
		}
		i := int(x)
		fr := x - float64(i)
		return w[i]*(1-fr) + w[i+1]*fr
	}
	for fi := range g.cfg.FreqsHz {
		d, ab := chans[2*fi].Samples, chans[2*fi+1].Samples
		for k := range w {
			x := float64(k)
			d[k] += complex(at(x-shift)-at(x+shift)+0.05*w[k], 0)
			ab[k] += complex(w[k], 0)
		}
	}
}

// addNoise adds complex white noise of rms whiteV, 1/f-like noise (one
// first-order autoregressive process of rms pinkV per correlation length
// in pinkL, metres; equal power per decade approximates 1/f) and a slow
// drift: a random linear trend of up to ±driftV over the pull plus a
// 2 m-correlated wander of rms driftV/2.
func addNoise(x []complex128, r *rand.Rand, stepM, whiteV, pinkV float64, pinkL []float64, driftV float64) {
	n := len(x)
	ws := whiteV / math.Sqrt2
	for k := range x {
		x[k] += complex(ws*r.NormFloat64(), ws*r.NormFloat64())
	}
	// ar adds a first-order autoregressive process of correlation length
	// lambdaM. Slow processes are drawn every m samples (m ≤ λ/(8·step))
	// and interpolated linearly, which changes them negligibly and saves
	// most of the random draws.
	ar := func(lambdaM, rms float64) {
		if rms == 0 {
			return
		}
		m := max(1, min(32, int(lambdaM/stepM/8)))
		a := math.Exp(-float64(m) * stepM / lambdaM)
		b := math.Sqrt(1-a*a) * rms / math.Sqrt2
		prev := complex(rms/math.Sqrt2*r.NormFloat64(), rms/math.Sqrt2*r.NormFloat64())
		if m == 1 {
			for k := range x {
				prev = complex(a*real(prev)+b*r.NormFloat64(), a*imag(prev)+b*r.NormFloat64())
				x[k] += prev
			}
			return
		}
		for k0 := 0; k0 < n; k0 += m {
			next := complex(a*real(prev)+b*r.NormFloat64(), a*imag(prev)+b*r.NormFloat64())
			for k := k0; k < min(n, k0+m); k++ {
				fr := float64(k-k0) / float64(m)
				x[k] += prev*complex(1-fr, 0) + next*complex(fr, 0)
			}
			prev = next
		}
	}
	for _, l := range pinkL {
		ar(l, pinkV)
	}
	if driftV > 0 && n > 1 {
		slope := complex(driftV*(2*r.Float64()-1), driftV*(2*r.Float64()-1))
		for k := range x {
			x[k] += slope * complex(float64(k)/float64(n-1), 0)
		}
		ar(2, driftV/2)
	}
}
