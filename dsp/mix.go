package dsp

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// MixForm selects the model of a multi-frequency mix.
type MixForm int

const (
	// MixAffine is the general affine mix: a 2×2 real matrix per other
	// channel plus an offset, m = v1 − Σ A_k v_k − b (6 real parameters for
	// one other channel).
	MixAffine MixForm = iota + 1
	// MixRotateScale is the rotate-and-scale mix: one complex weight per
	// other channel plus an offset, m = z1 − Σ w_k z_k − c.
	MixRotateScale
)

// String returns "affine" or "rotate-scale".
func (f MixForm) String() string {
	switch f {
	case MixAffine:
		return "affine"
	case MixRotateScale:
		return "rotate-scale"
	}
	return fmt.Sprintf("MixForm(%d)", int(f))
}

// ParseMixForm reads "affine" or "rotate-scale".
func ParseMixForm(s string) (MixForm, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "affine":
		return MixAffine, nil
	case "rotate-scale", "rotatescale", "rotate_scale":
		return MixRotateScale, nil
	}
	return 0, fmt.Errorf("mix form %q: expected affine or rotate-scale", s)
}

// MarshalText implements encoding.TextMarshaler.
func (f MixForm) MarshalText() ([]byte, error) {
	if f != MixAffine && f != MixRotateScale {
		return nil, fmt.Errorf("mix form %d: expected affine or rotate-scale", int(f))
	}
	return []byte(f.String()), nil
}

// UnmarshalText implements encoding.TextUnmarshaler.
func (f *MixForm) UnmarshalText(b []byte) error {
	v, err := ParseMixForm(string(b))
	if err != nil {
		return err
	}
	*f = v
	return nil
}

// MixWindow is one training window with its quality figures.
type MixWindow struct {
	// Start and End are the half-open sample range [Start, End).
	Start int `json:"start"`
	End   int `json:"end"`
	// PrimaryVppV is the peak-to-peak amplitude of the primary channel in
	// the window before mixing, ResidualVppV that of the mix output.
	PrimaryVppV  float64 `json:"primary_vpp_v"`
	ResidualVppV float64 `json:"residual_vpp_v"`
}

// Mix is a trained multi-frequency mix, m = v1 − Σ_k A_k v_k − b with
// v = [X Y]ᵀ (FIELD.md §2.2). It is JSON-serialisable (see
// docs/processing-chain.md) so that a mix trained on a calibration tube can
// be applied to any scan.
type Mix struct {
	Form MixForm `json:"form"`
	// Primary and Others name the input channels (informational; Apply takes
	// samples).
	Primary string   `json:"primary,omitempty"`
	Others  []string `json:"others,omitempty"`
	// Matrices holds A_k, row-major: [[a11 a12] [a21 a22]] acting on
	// [X_k Y_k]ᵀ. For the rotate-and-scale form A_k = |w|·R(arg w).
	Matrices [][2][2]float64 `json:"matrices"`
	// OffsetV is b = [bx by] in volts.
	OffsetV [2]float64 `json:"offset_v"`
	// Windows are the training windows and their before/after figures.
	Windows []MixWindow `json:"windows"`
	// ResidualRatio is the largest ResidualVppV/PrimaryVppV over the windows.
	ResidualRatio float64 `json:"residual_ratio"`
	// ConditionNumber is the 2-norm condition number of the least-squares
	// design matrix (one row per training sample, columns X_k, Y_k, 1 for the
	// affine form).
	ConditionNumber float64 `json:"condition_number"`
	// TrainingSamples is the number of samples in all windows.
	TrainingSamples int `json:"training_samples"`
	// Reference, when set by SetReference, is the window of a reference
	// flaw (for example the 20 % flat-bottom hole) and ReferenceRatio the
	// largest residual Vpp over the training windows divided by the flaw's
	// Vpp in the mix output: procedures ask for the support residual to be
	// small against the smallest reportable flaw (FIELD.md §2.2).
	Reference      *MixWindow `json:"reference,omitempty"`
	ReferenceRatio float64    `json:"reference_ratio,omitempty"`
}

// SetReference records the reference-flaw figures of a trained mix: the
// flaw's Vpp in the primary and in the mix output over window (half-open),
// and ReferenceRatio. It panics if the channels differ in length or in
// number from training; it returns an error for a window out of range or a
// flaw with no signal in the mix.
func (m *Mix) SetReference(primary []complex128, others [][]complex128, window [2]int) error {
	if err := checkWindow(window, len(primary)); err != nil {
		return fmt.Errorf("%w: reference flaw %w", ErrMix, err)
	}
	out := m.Apply(nil, primary, others)
	w := MixWindow{Start: window[0], End: window[1], PrimaryVppV: Vpp(primary[window[0]:window[1]]), ResidualVppV: Vpp(out[window[0]:window[1]])}
	if w.ResidualVppV == 0 {
		return fmt.Errorf("%w: reference flaw window %d:%d has no signal in the mix", ErrMix, window[0], window[1])
	}
	var worst float64
	for _, tw := range m.Windows {
		worst = math.Max(worst, tw.ResidualVppV)
	}
	m.Reference = &w
	m.ReferenceRatio = worst / w.ResidualVppV
	return nil
}

// ErrMix is returned (wrapped) when a mix cannot be trained or read.
var ErrMix = errors.New("mix")

// TrainMix fits a mix of primary against one or two other channels by
// linear least squares over the training windows (half-open sample ranges
// [start, end)), as written in FIELD.md §2.2:
//
// Affine: solve D·βx ≈ X1 and D·βy ≈ Y1 with D = [X2 Y2 (X3 Y3) 1] by QR
// (gonum mat.Dense.Solve).
// Rotate-and-scale: minimise Σ|z1 − Σ w_k z_k − c|² over complex w_k and c,
// solved as a real least-squares problem with rows for X and Y; with one
// other channel this is w = Σ(z1−z̄1)conj(z2−z̄2)/Σ|z2−z̄2|².
//
// It panics if the channels differ in length. It returns an error wrapping
// ErrMix for other than 1 or 2 other channels, windows out of range, fewer
// training samples than unknowns, non-finite samples or a rank-deficient
// design.
func TrainMix(form MixForm, primary []complex128, others [][]complex128, windows [][2]int) (*Mix, error) {
	n := len(primary)
	for _, o := range others {
		if len(o) != n {
			panic("dsp: mix channels differ in length")
		}
	}
	if len(others) < 1 || len(others) > 2 {
		return nil, fmt.Errorf("%w: %d other channels: expected 1 or 2", ErrMix, len(others))
	}
	if form != MixAffine && form != MixRotateScale {
		return nil, fmt.Errorf("%w: unknown form %d", ErrMix, int(form))
	}
	if len(windows) == 0 {
		return nil, fmt.Errorf("%w: no training window", ErrMix)
	}
	var idx []int
	for _, w := range windows {
		if err := checkWindow(w, n); err != nil {
			return nil, fmt.Errorf("%w: training %w", ErrMix, err)
		}
		for i := w[0]; i < w[1]; i++ {
			idx = append(idx, i)
		}
	}
	for _, i := range idx {
		if !finite(primary[i]) {
			return nil, fmt.Errorf("%w: primary sample %d is %v", ErrMix, i, primary[i])
		}
		for k, o := range others {
			if !finite(o[i]) {
				return nil, fmt.Errorf("%w: other channel %d sample %d is %v", ErrMix, k+1, i, o[i])
			}
		}
	}
	K := len(others)
	m := &Mix{Form: form, TrainingSamples: len(idx), Matrices: make([][2][2]float64, K)}
	switch form {
	case MixAffine:
		p := 2*K + 1
		if len(idx) < p+1 {
			return nil, fmt.Errorf("%w: %d training samples for %d unknowns per component", ErrMix, len(idx), p)
		}
		d := mat.NewDense(len(idx), p, nil)
		rhs := mat.NewDense(len(idx), 2, nil)
		for r, i := range idx {
			for k, o := range others {
				d.Set(r, 2*k, real(o[i]))
				d.Set(r, 2*k+1, imag(o[i]))
			}
			d.Set(r, p-1, 1)
			rhs.Set(r, 0, real(primary[i]))
			rhs.Set(r, 1, imag(primary[i]))
		}
		cond, beta, err := solveLS(d, rhs)
		if err != nil {
			return nil, err
		}
		m.ConditionNumber = cond
		for k := 0; k < K; k++ {
			m.Matrices[k] = [2][2]float64{
				{beta.At(2*k, 0), beta.At(2*k+1, 0)},
				{beta.At(2*k, 1), beta.At(2*k+1, 1)},
			}
		}
		m.OffsetV = [2]float64{beta.At(p-1, 0), beta.At(p-1, 1)}
	case MixRotateScale:
		p := 2*K + 2
		if 2*len(idx) < p+1 {
			return nil, fmt.Errorf("%w: %d training samples for %d unknowns", ErrMix, len(idx), p)
		}
		d := mat.NewDense(2*len(idx), p, nil)
		rhs := mat.NewDense(2*len(idx), 1, nil)
		for r, i := range idx {
			for k, o := range others {
				x, y := real(o[i]), imag(o[i])
				// X row: wr·x − wi·y; Y row: wr·y + wi·x.
				d.Set(2*r, 2*k, x)
				d.Set(2*r, 2*k+1, -y)
				d.Set(2*r+1, 2*k, y)
				d.Set(2*r+1, 2*k+1, x)
			}
			d.Set(2*r, p-2, 1)
			d.Set(2*r+1, p-1, 1)
			rhs.Set(2*r, 0, real(primary[i]))
			rhs.Set(2*r+1, 0, imag(primary[i]))
		}
		cond, beta, err := solveLS(d, rhs)
		if err != nil {
			return nil, err
		}
		m.ConditionNumber = cond
		for k := 0; k < K; k++ {
			wr, wi := beta.At(2*k, 0), beta.At(2*k+1, 0)
			m.Matrices[k] = [2][2]float64{{wr, -wi}, {wi, wr}}
		}
		m.OffsetV = [2]float64{beta.At(p-2, 0), beta.At(p-1, 0)}
	}
	out := m.Apply(nil, primary, others)
	for _, w := range windows {
		mw := MixWindow{Start: w[0], End: w[1], PrimaryVppV: Vpp(primary[w[0]:w[1]]), ResidualVppV: Vpp(out[w[0]:w[1]])}
		m.Windows = append(m.Windows, mw)
		if mw.PrimaryVppV > 0 {
			m.ResidualRatio = math.Max(m.ResidualRatio, mw.ResidualVppV/mw.PrimaryVppV)
		}
	}
	return m, nil
}

func finite(z complex128) bool { return !cmplx.IsNaN(z) && !cmplx.IsInf(z) }

// solveLS solves d·β ≈ rhs in the least-squares sense and returns the
// condition number of d.
func solveLS(d, rhs *mat.Dense) (float64, *mat.Dense, error) {
	cond := mat.Cond(d, 2)
	if math.IsInf(cond, 0) || math.IsNaN(cond) || cond > 1e12 {
		return cond, nil, fmt.Errorf("%w: design matrix is rank deficient (condition number %.3g): the other channels carry no independent signal in the training windows", ErrMix, cond)
	}
	var beta mat.Dense
	if err := beta.Solve(d, rhs); err != nil {
		return cond, nil, fmt.Errorf("%w: least squares: %w", ErrMix, err)
	}
	return cond, &beta, nil
}

// Apply returns the mix output m = z1 − Σ A_k v_k − b in dst (nil:
// allocated; dst may be primary). It panics if the number of other channels
// differs from training or lengths differ.
func (m *Mix) Apply(dst, primary []complex128, others [][]complex128) []complex128 {
	if len(others) != len(m.Matrices) {
		panic("dsp: mix applied to a different number of channels than trained")
	}
	for _, o := range others {
		if len(o) != len(primary) {
			panic("dsp: mix channels differ in length")
		}
	}
	dst = useDst(dst, len(primary))
	bx, by := m.OffsetV[0], m.OffsetV[1]
	for i, z := range primary {
		x, y := real(z)-bx, imag(z)-by
		for k, a := range m.Matrices {
			ox, oy := real(others[k][i]), imag(others[k][i])
			x -= a[0][0]*ox + a[0][1]*oy
			y -= a[1][0]*ox + a[1][1]*oy
		}
		dst[i] = complex(x, y)
	}
	return dst
}

// Validate reports a mix that cannot be applied: unknown form, no or more
// than two matrices, non-finite coefficients, or other-channel names that
// do not match the matrices.
func (m *Mix) Validate() error {
	if m.Form != MixAffine && m.Form != MixRotateScale {
		return fmt.Errorf("%w: unknown form %d", ErrMix, int(m.Form))
	}
	if len(m.Matrices) < 1 || len(m.Matrices) > 2 {
		return fmt.Errorf("%w: %d matrices: expected 1 or 2", ErrMix, len(m.Matrices))
	}
	if len(m.Others) != 0 && len(m.Others) != len(m.Matrices) {
		return fmt.Errorf("%w: %d other channel names for %d matrices", ErrMix, len(m.Others), len(m.Matrices))
	}
	for k, a := range m.Matrices {
		for _, row := range a {
			for _, v := range row {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					return fmt.Errorf("%w: matrix %d has a non-finite coefficient", ErrMix, k+1)
				}
			}
		}
	}
	for _, v := range m.OffsetV {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: non-finite offset", ErrMix)
		}
	}
	return nil
}

// ParseMix reads a mix from its JSON form and validates it. Unknown fields
// are errors, so a misspelt key is not silently ignored.
func ParseMix(b []byte) (*Mix, error) {
	dec := json.NewDecoder(strings.NewReader(string(b)))
	dec.DisallowUnknownFields()
	var m Mix
	if err := dec.Decode(&m); err != nil {
		return nil, fmt.Errorf("%w file: %w", ErrMix, jsonErr(b, err, dec.InputOffset()))
	}
	if dec.More() {
		return nil, fmt.Errorf("%w file: data after the mix object", ErrMix)
	}
	if err := m.Validate(); err != nil {
		return nil, err
	}
	return &m, nil
}

// jsonErr adds the line and column to a JSON decoding error: the error's
// own offset for syntax and type errors, otherwise (an unknown key) the
// decoder's position when it stopped, given as at, which is just after
// the offending member.
func jsonErr(b []byte, err error, at int64) error {
	off := at
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		off = se.Offset
	case errors.As(err, &te):
		off = te.Offset
	case errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF):
		off = int64(len(b))
		err = fmt.Errorf("unexpected end of input: %w", err)
	}
	if off < 0 || off > int64(len(b)) {
		return err
	}
	line, col := 1, 1
	for _, c := range b[:off] {
		if c == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return fmt.Errorf("line %d, column %d: %w", line, col, err)
}
