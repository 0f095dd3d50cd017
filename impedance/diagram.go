package impedance

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"runtime"
	"strconv"
	"strings"
	"sync"
)

// Family is a kind of impedance-plane diagram: the quantity that varies
// along each curve.
type Family string

// Diagram families.
const (
	// FamilyConductivity: conductivity varies along each curve; one curve
	// per lift-off.
	FamilyConductivity Family = "conductivity"
	// FamilyLiftoff: lift-off varies along each curve (lift-off lines);
	// one curve per conductivity.
	FamilyLiftoff Family = "liftoff"
	// FamilyThickness: plate thickness varies; one curve per conductivity.
	FamilyThickness Family = "thickness"
	// FamilyPermeability: relative permeability varies; one curve per
	// conductivity.
	FamilyPermeability Family = "permeability"
	// FamilyFrequency: frequency varies (each point normalised by the X0 of
	// its own frequency); one curve per conductivity.
	FamilyFrequency Family = "frequency"
)

// Families lists the diagram families.
func Families() []Family {
	return []Family{FamilyConductivity, FamilyLiftoff, FamilyThickness, FamilyPermeability, FamilyFrequency}
}

// Param returns the name of the quantity that varies along the curves, with
// its unit, and the name of the quantity that labels the curves.
func (f Family) Param() (along, across string) {
	switch f {
	case FamilyConductivity:
		return "conductivity_s_per_m", "liftoff_m"
	case FamilyLiftoff:
		return "liftoff_m", "conductivity_s_per_m"
	case FamilyThickness:
		return "thickness_m", "conductivity_s_per_m"
	case FamilyPermeability:
		return "rel_permeability", "conductivity_s_per_m"
	case FamilyFrequency:
		return "freq_hz", "conductivity_s_per_m"
	}
	return "", ""
}

// DiagramSpec describes an impedance-plane diagram for one coil.
type DiagramSpec struct {
	Family Family
	// FreqHz is the frequency of every family but FamilyFrequency.
	FreqHz float64
	// LiftoffM is the lift-off of the families whose curves are per
	// conductivity.
	LiftoffM float64
	// Specimen is the base specimen: its thickness (0 = half-space) and
	// permeability hold where the family does not vary them.
	Specimen Specimen
	// Values are the values along each curve, in SI (S/m, m, μr or Hz),
	// in the order they are drawn.
	Values []float64
	// Curves holds one value per curve: lift-offs (m) for
	// FamilyConductivity, conductivities (S/m) for the others.
	Curves []float64
	// Workers bounds the concurrency; 0 means runtime.GOMAXPROCS(0).
	Workers int
}

// Curve is one line of an impedance-plane diagram in normalised
// coordinates ΔR/X0 + jX/X0.
type Curve struct {
	Label  string       // for example "lift-off 0.3 mm"
	Param  string       // the quantity along the curve, e.g. "conductivity_s_per_m"
	Value  float64      // the value that labels the curve (lift-off or conductivity, SI)
	Values []float64    // parameter value of each point, SI
	Points []complex128 // normalised impedance of each point
}

// Marker is a labelled point of a diagram, such as the air point.
type Marker struct {
	Label string
	Point complex128
}

// Diagram is a computed family of impedance-plane curves.
type Diagram struct {
	Family  Family
	Title   string
	FreqHz  float64
	XLabel  string // "ΔR/X0"
	YLabel  string // "X/X0"
	Curves  []Curve
	Markers []Marker
}

// ComputeDiagram evaluates the diagram described by spec with the model m,
// spreading the points over spec.Workers goroutines. It stops early and
// returns ctx.Err() when ctx is cancelled, and returns the first model
// error otherwise.
func ComputeDiagram(ctx context.Context, m PlanarForward, spec DiagramSpec) (*Diagram, error) {
	if err := spec.validate(); err != nil {
		return nil, err
	}
	along, _ := spec.Family.Param()
	d := &Diagram{Family: spec.Family, FreqHz: spec.FreqHz, XLabel: "ΔR/X0", YLabel: "X/X0"}
	d.Title = diagramTitle(spec)
	d.Curves = make([]Curve, len(spec.Curves))
	for i, cv := range spec.Curves {
		d.Curves[i] = Curve{Label: curveLabel(spec.Family, cv), Param: along, Value: cv,
			Values: append([]float64(nil), spec.Values...), Points: make([]complex128, len(spec.Values))}
	}
	type job struct{ i, j int }
	jobs := make(chan job)
	workers := spec.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	var wg sync.WaitGroup
	var once sync.Once
	var firstErr error
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for jb := range jobs {
				z, err := spec.point(m, spec.Curves[jb.i], spec.Values[jb.j])
				if err != nil {
					once.Do(func() {
						firstErr = fmt.Errorf("%s %g, %s %g: %w", curveQuantity(spec.Family), spec.Curves[jb.i], along, spec.Values[jb.j], err)
						cancel()
					})
					continue
				}
				d.Curves[jb.i].Points[jb.j] = z
			}
		}()
	}
send:
	for i := range spec.Curves {
		for j := range spec.Values {
			select {
			case jobs <- job{i, j}:
			case <-ctx.Done():
				break send
			}
		}
	}
	close(jobs)
	wg.Wait()
	if firstErr != nil {
		return nil, firstErr
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	d.Markers = append(d.Markers, Marker{Label: "air", Point: 1i})
	return d, nil
}

// point returns the normalised impedance of one point of the diagram.
func (s DiagramSpec) point(m PlanarForward, curve, v float64) (complex128, error) {
	sp := s.Specimen
	freq, h := s.FreqHz, s.LiftoffM
	switch s.Family {
	case FamilyConductivity:
		sp.ConductivitySPerM, h = v, curve
	case FamilyLiftoff:
		sp.ConductivitySPerM, h = curve, v
	case FamilyThickness:
		sp.ConductivitySPerM, sp.ThicknessM = curve, v
	case FamilyPermeability:
		sp.ConductivitySPerM, sp.RelPermeability = curve, v
	case FamilyFrequency:
		sp.ConductivitySPerM, freq = curve, v
	}
	return NormalizedImpedance(m, freq, h, 1, sp)
}

func (s DiagramSpec) validate() error {
	along, _ := s.Family.Param()
	if along == "" {
		return fmt.Errorf("diagram family %q: expected one of conductivity, liftoff, thickness, permeability, frequency", s.Family)
	}
	if s.Family != FamilyFrequency && (!(s.FreqHz > 0) || math.IsInf(s.FreqHz, 0)) {
		return fmt.Errorf("frequency %v Hz: expected a finite positive value", s.FreqHz)
	}
	if s.Family != FamilyConductivity && s.Family != FamilyLiftoff && (!(s.LiftoffM > 0) || math.IsInf(s.LiftoffM, 0)) {
		return fmt.Errorf("lift-off %v m: expected a finite positive value", s.LiftoffM)
	}
	if err := s.Specimen.validate(); err != nil {
		return err
	}
	if len(s.Values) < 2 {
		return fmt.Errorf("diagram needs at least 2 values of %s, got %d", along, len(s.Values))
	}
	if len(s.Curves) == 0 {
		return fmt.Errorf("diagram needs at least one curve")
	}
	for _, v := range s.Values {
		ok := v > 0 && !math.IsInf(v, 0)
		if s.Family == FamilyPermeability {
			ok = v >= 1 && !math.IsInf(v, 0)
		}
		if s.Family == FamilyThickness && math.IsInf(v, 1) {
			ok = true
		}
		if !ok {
			return fmt.Errorf("%s value %v: expected a finite positive value (μr ≥ 1)", along, v)
		}
	}
	for _, v := range s.Curves {
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("%s %v: expected a finite positive value", curveQuantity(s.Family), v)
		}
	}
	return nil
}

func curveQuantity(f Family) string {
	if f == FamilyConductivity {
		return "lift-off (m)"
	}
	return "conductivity (S/m)"
}

// curveLabel names a curve by its value in the units people read.
func curveLabel(f Family, v float64) string {
	if f == FamilyConductivity {
		return "lift-off " + FormatLength(v)
	}
	return FormatConductivity(v)
}

// formatNum writes v with three significant digits, without an exponent
// between 0.001 and 10⁶.
func formatNum(v float64) string {
	a := math.Abs(v)
	if a == 0 || a < 1e-3 || a >= 1e6 {
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	digits := 2 - int(math.Floor(math.Log10(a)))
	if digits < 0 {
		r := math.Pow(10, float64(-digits))
		return strconv.FormatFloat(math.Round(v/r)*r, 'f', 0, 64)
	}
	t := strconv.FormatFloat(v, 'f', digits, 64)
	if strings.Contains(t, ".") {
		t = strings.TrimRight(strings.TrimRight(t, "0"), ".")
	}
	return t
}

// FormatLength writes a length in mm or µm for a label.
func FormatLength(m float64) string {
	if math.IsInf(m, 1) {
		return "∞"
	}
	if math.Abs(m) < 1e-4 {
		return formatNum(m*1e6) + " µm"
	}
	return formatNum(m*1e3) + " mm"
}

// FormatConductivity writes a conductivity as %IACS and MS/m for a label.
func FormatConductivity(s float64) string {
	return formatNum(s/58e4) + " %IACS (" + formatNum(s/1e6) + " MS/m)"
}

// FormatFrequency writes a frequency in Hz, kHz or MHz for a label.
func FormatFrequency(f float64) string {
	switch {
	case f >= 1e6:
		return formatNum(f/1e6) + " MHz"
	case f >= 1e3:
		return formatNum(f/1e3) + " kHz"
	}
	return formatNum(f) + " Hz"
}

// FormatParam writes a value of the quantity that varies along the curves
// of family f.
func FormatParam(f Family, v float64) string {
	switch f {
	case FamilyConductivity:
		return formatNum(v/58e4) + " %IACS"
	case FamilyLiftoff, FamilyThickness:
		return FormatLength(v)
	case FamilyPermeability:
		return "μr " + formatNum(v)
	case FamilyFrequency:
		return FormatFrequency(v)
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}

func diagramTitle(s DiagramSpec) string {
	switch s.Family {
	case FamilyConductivity:
		return "Conductivity curves at " + FormatFrequency(s.FreqHz)
	case FamilyLiftoff:
		return "Lift-off lines at " + FormatFrequency(s.FreqHz)
	case FamilyThickness:
		return "Thickness curves at " + FormatFrequency(s.FreqHz) + ", lift-off " + FormatLength(s.LiftoffM)
	case FamilyPermeability:
		return "Permeability curves at " + FormatFrequency(s.FreqHz) + ", lift-off " + FormatLength(s.LiftoffM)
	}
	return "Frequency sweep, lift-off " + FormatLength(s.LiftoffM)
}

// LogSpace returns n values spaced evenly in logarithm from lo to hi
// inclusive. It panics if n < 2 or lo, hi are not positive.
func LogSpace(lo, hi float64, n int) []float64 {
	if n < 2 || !(lo > 0) || !(hi > 0) {
		panic("impedance: LogSpace needs n ≥ 2 and positive limits")
	}
	out := make([]float64, n)
	a, b := math.Log(lo), math.Log(hi)
	for i := range out {
		out[i] = math.Exp(a + (b-a)*float64(i)/float64(n-1))
	}
	out[n-1] = hi
	return out
}

// ConductivitySpan returns the conductivities (S/m) at which the
// dimensionless parameter ωμ0μrσr̄² of the coil (Dodd–Deeds; r̄ the mean
// radius) takes the values betaLo and betaHi at freqHz: a span that runs
// the conductivity curve from near the air point (β ≈ 0.01) to near the
// perfect-conductor point (β ≈ 1e4).
func ConductivitySpan(c Coil, freqHz, mur, betaLo, betaHi float64) (lo, hi float64) {
	if mur == 0 {
		mur = 1
	}
	rbar := (c.InnerRadiusM + c.OuterRadiusM) / 2
	k := 2 * math.Pi * freqHz * mu0 * mur * rbar * rbar
	return betaLo / k, betaHi / k
}

// WriteCSV writes the diagram as CSV with the header
// curve,label,param,value,dr_over_x0,x_over_x0: one row per point, values
// in SI, full precision.
func (d *Diagram) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"curve", "label", "param", "value", "dr_over_x0", "x_over_x0"}); err != nil {
		return err
	}
	for i, c := range d.Curves {
		for j, z := range c.Points {
			rec := []string{strconv.Itoa(i + 1), c.Label, c.Param, strconv.FormatFloat(c.Values[j], 'g', -1, 64),
				strconv.FormatFloat(real(z), 'g', -1, 64), strconv.FormatFloat(imag(z), 'g', -1, 64)}
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
