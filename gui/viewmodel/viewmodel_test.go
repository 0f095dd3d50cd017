package viewmodel_test

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"whorl/gui/viewmodel"
	"whorl/gui/viewmodel/vmtest"
)

// serial returns a post function that applies results one at a time, as
// the UI thread would.
func serial() func(func()) {
	var mu sync.Mutex
	return func(f func()) {
		mu.Lock()
		defer mu.Unlock()
		f()
	}
}

func TestDecimateKeepsEveryPeak(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	n := 10007
	z := make([]complex128, n)
	axis := make([]float64, n)
	for i := range z {
		z[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		axis[i] = float64(i) * 0.001
	}
	z[5000] = complex(50, -50) // an isolated peak must survive decimation
	for _, tc := range []struct {
		name   string
		lo, hi int
		cols   int
	}{
		{"all samples into 300 columns", 0, n, 300},
		{"a part into 1366 columns", 4000, 6000, 1366},
		{"more columns than samples", 4990, 5010, 200},
	} {
		t.Run(tc.name, func(t *testing.T) {
			from, to := axis[tc.lo], axis[tc.hi-1]
			for _, p := range []viewmodel.Part{viewmodel.PartX, viewmodel.PartY} {
				got := viewmodel.Decimate(nil, z, axis, p, tc.lo, tc.hi, from, to, tc.cols)
				if len(got) != tc.cols {
					t.Fatalf("len = %d, want %d", len(got), tc.cols)
				}
				// Reference: brute force, each sample into its column
				// (closed form of the column mapping in the doc comment).
				lo, hi := math.Inf(1), math.Inf(-1)
				for i := tc.lo; i < tc.hi; i++ {
					v := real(z[i])
					if p == viewmodel.PartY {
						v = imag(z[i])
					}
					c := min(max(int((axis[i]-from)*float64(tc.cols)/(to-from)), 0), tc.cols-1)
					s := got[c]
					if s.Empty || float32(v) < s.Min || float32(v) > s.Max {
						t.Fatalf("%v sample %d (%v) not inside column %d span %+v", p, i, v, c, s)
					}
					lo, hi = math.Min(lo, v), math.Max(hi, v)
				}
				var glo, ghi float32 = float32(math.Inf(1)), float32(math.Inf(-1))
				for _, s := range got {
					if !s.Empty {
						glo, ghi = min(glo, s.Min), max(ghi, s.Max)
					}
				}
				if glo != float32(lo) || ghi != float32(hi) {
					t.Errorf("%v extremes got [%v, %v], want [%v, %v]", p, glo, ghi, lo, hi)
				}
			}
		})
	}
}

func TestIndexRange(t *testing.T) {
	t.Parallel()
	inc := []float64{0, 1, 2, 3, 4, 5}
	dec := []float64{5, 4, 3, 2, 1, 0}
	for _, tc := range []struct {
		name           string
		axis           []float64
		from, to       float64
		wantLo, wantHi int
	}{
		{"increasing inner", inc, 1.5, 3.5, 2, 4},
		{"increasing exact ends", inc, 1, 3, 1, 4},
		{"decreasing inner", dec, 1.5, 3.5, 2, 4},
		{"nil axis is sample numbers", nil, 1.2, 3.9, 2, 4},
		{"reversed bounds", inc, 3, 1, 1, 4},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi := viewmodel.IndexRange(tc.axis, 6, tc.from, tc.to)
			if lo != tc.wantLo || hi != tc.wantHi {
				t.Errorf("IndexRange(%v, %v, %v) = %d, %d; want %d, %d", tc.axis, tc.from, tc.to, lo, hi, tc.wantLo, tc.wantHi)
			}
		})
	}
}

func TestTicks(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		lo, hi float64
		n      int
		want   []float64
	}{
		{0, 10, 5, []float64{0, 2, 4, 6, 8, 10}},
		{-0.37, 0.41, 4, []float64{-0.2, 0, 0.2, 0.4}},
		{1.02, 1.08, 3, []float64{1.02, 1.04, 1.06, 1.08}},
	} {
		got, _ := viewmodel.Ticks(tc.lo, tc.hi, tc.n)
		if len(got) != len(tc.want) {
			t.Errorf("Ticks(%v, %v, %d) = %v, want %v", tc.lo, tc.hi, tc.n, got, tc.want)
			continue
		}
		for i := range got {
			if !scalar.EqualWithinAbsOrRel(got[i], tc.want[i], 1e-12, 1e-12) {
				t.Errorf("Ticks(%v, %v, %d)[%d] = %v, want %v", tc.lo, tc.hi, tc.n, i, got[i], tc.want[i])
			}
		}
	}
}

func TestChartWindowStaysInside(t *testing.T) {
	t.Parallel()
	axis := make([]float64, 1001)
	for i := range axis {
		axis[i] = float64(i) * 0.001 // 0 … 1 m
	}
	c := viewmodel.NewChart(axis, len(axis), "position", "m", 40)
	if w := c.Samples(); w.Len() < 39 || w.Len() > 42 {
		t.Errorf("default window %+v: want about 40 samples", w)
	}
	c.SetWindow(-0.5, -0.45)
	if c.WinFrom != 0 || !scalar.EqualWithinAbsOrRel(c.WinTo, 0.05, 1e-12, 0) {
		t.Errorf("window before the start: got [%v, %v], want [0, 0.05]", c.WinFrom, c.WinTo)
	}
	c.SetWindow(0.3, 0.3)
	if w := c.Samples(); w.Len() < 4 {
		t.Errorf("zero-width window kept %d samples, want ≥ 4", w.Len())
	}
	c.Zoom(10, 0.3)
	if vw := c.ViewTo - c.ViewFrom; !scalar.EqualWithinAbsOrRel(vw, 0.1, 1e-9, 0) {
		t.Errorf("zoom ×10 of 1 m: view width %v, want 0.1", vw)
	}
	if u, f := c.DisplayUnit(); u != "mm" || f != 1000 {
		t.Errorf("display unit of a 0.1 m view = %q ×%v, want mm ×1000", u, f)
	}
	c.MoveWindow(0.5) // leaves the view: the view must follow
	if c.WinFrom < c.ViewFrom || c.WinTo > c.ViewTo {
		t.Errorf("window [%v, %v] outside view [%v, %v]", c.WinFrom, c.WinTo, c.ViewFrom, c.ViewTo)
	}
	c.Pan(100)
	if c.ViewTo != 1 {
		t.Errorf("pan far right: view ends at %v, want 1", c.ViewTo)
	}
}

func TestPlaneTransformIsDisplayOnly(t *testing.T) {
	t.Parallel()
	p := viewmodel.Plane{SpanV: 4, Null: complex(1, 1)}
	p.Rotate(math.Pi / 2)
	z := complex(2, 1)
	got := p.Apply(z)
	// (z − null)·e^{jπ/2} = (1 + 0j)·j = j (closed form).
	if cmplx.Abs(got-complex(0, 1)) > 1e-12 {
		t.Errorf("Apply(%v) = %v, want 1i", z, got)
	}
	if z != complex(2, 1) {
		t.Errorf("sample changed to %v", z)
	}
	p.Rotate(3 * math.Pi / 2) // total 2π wraps to 0
	if math.Abs(p.RotationRad) > 1e-12 {
		t.Errorf("rotation after a full turn = %v, want 0", p.RotationRad)
	}
}

func open(t *testing.T, role viewmodel.Role) (*vmtest.Source, *viewmodel.Workstation) {
	t.Helper()
	src := vmtest.New(viewmodel.Actor{Name: "R. Quill", Role: role}, 4, 1000)
	ws := viewmodel.NewWorkstation(src, serial())
	t.Cleanup(ws.Close)
	ws.Load()
	ws.Wait()
	ws.Wait() // the first component is opened after the list arrives
	return src, ws
}

func TestWorkstationReview(t *testing.T) {
	t.Parallel()
	src, ws := open(t, viewmodel.Level2)
	if got := ws.Current(); got != "T01" {
		t.Fatalf("first component = %q, want T01", got)
	}
	if ws.Tube() == nil {
		t.Fatal("no tube opened")
	}
	// The first call is selected and the window sits on it.
	m, ok := ws.Measurement()
	if !ok {
		t.Fatalf("no measurement; message %v", msg(ws))
	}
	// The invented flaw's chord is 1 V × gain 1 along its direction
	// (vmtest.Scan: −u·exp(−u²)·1.1658 has peak-to-peak 1.1658·√2·e^{−1/2} ≈ 1.000).
	if !scalar.EqualWithinAbsOrRel(m.VppV, 1, 0, 0.01) {
		t.Errorf("Vpp on the first call = %v V, want 1 V within 1 %%", m.VppV)
	}
	before := m
	ws.StepWindow(-2) // two window widths off the flaw: only wobble left
	ws.Wait()
	m, _ = ws.Measurement()
	if m.Window == before.Window || m.VppV > 0.5 {
		t.Errorf("after moving the window: %+v, want a new window and a small Vpp", m)
	}
	ws.Next(1)
	ws.Wait()
	if ws.Current() != "T02" {
		t.Errorf("next component = %q, want T02", ws.Current())
	}
	ws.Next(-1)
	ws.Wait()
	ws.SetFilter(viewmodel.WithIndications)
	if n := len(ws.Components()); n != 2 {
		t.Errorf("components with indications = %d, want 2", n)
	}
	ws.SetFilter()
	ws.SetSearch("t03")
	if c := ws.Components(); len(c) != 1 || c[0].ID != "T03" {
		t.Errorf("search t03 = %+v", c)
	}
	ws.SetSearch("")

	// Accept the first call, reject the second: both reach the audit trail.
	ws.SelectCall(0)
	ws.Wait()
	id0 := ws.Calls()[0].ID
	ws.Decide(viewmodel.Decision{Kind: viewmodel.Accept})
	ws.Wait()
	ws.SelectCall(1)
	ws.Wait()
	id1 := ws.Calls()[1].ID
	ws.Decide(viewmodel.Decision{Kind: viewmodel.Reject, Comment: "support residue"})
	ws.Wait()
	if s := ws.Calls()[0].State; s != viewmodel.Accepted {
		t.Errorf("call %s state %q, want accepted", id0, s)
	}
	if s := ws.Calls()[1].State; s != viewmodel.Rejected {
		t.Errorf("call %s state %q, want rejected", id1, s)
	}
	for id, action := range map[string]string{id0: "call accept", id1: "call reject"} {
		ev, _ := src.Events(context.Background(), id)
		if len(ev) != 1 || ev[0].Action != action || ev[0].Actor != "R. Quill" {
			t.Errorf("events of %s = %+v, want one %q by R. Quill", id, ev, action)
		}
	}
	if c := ws.Components(); c[0].Status != viewmodel.Resolved {
		t.Errorf("T01 status after deciding every call = %v, want resolved", c[0].Status)
	}
	// An analyst call from the current measurement.
	ws.AddCall("wear", "at the plate")
	ws.Wait()
	if i := ws.SelectedCall(); i < 0 || ws.Calls()[i].Origin != "analyst" || ws.Calls()[i].Type != "wear" {
		t.Errorf("added call not selected: %d %+v", i, ws.Calls())
	}
}

func msg(ws *viewmodel.Workstation) string { m, _ := ws.Message(); return m }

func TestDecisionRefusedForRole(t *testing.T) {
	t.Parallel()
	_, ws := open(t, viewmodel.QA)
	ws.Decide(viewmodel.Decision{Kind: viewmodel.Accept})
	ws.Wait()
	m, isErr := ws.Message()
	if !isErr || !strings.Contains(m, "may not decide") {
		t.Errorf("message %q (error %v), want the refusal", m, isErr)
	}
	if s := ws.Calls()[0].State; s != viewmodel.Proposed {
		t.Errorf("state after a refused decision = %q, want proposed", s)
	}
}

func TestCalibrationApproval(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		role        viewmodel.Role
		wantRefused bool
	}{
		{viewmodel.Level2, true},
		{viewmodel.Level3, false},
	} {
		t.Run(string(tc.role), func(t *testing.T) {
			src := vmtest.New(viewmodel.Actor{Name: "K. Fenn", Role: tc.role}, 1, 200)
			cv := viewmodel.NewCalibrations(src, serial())
			cv.Load()
			cv.Wait()
			cv.Wait()
			if cv.Detail() == nil {
				t.Fatal("no calibration opened")
			}
			cv.Approve("curve checked against the standard")
			cv.Wait()
			cv.Wait()
			m, _, refused := cv.Message()
			if refused != tc.wantRefused {
				t.Errorf("refused = %v (%q), want %v", refused, m, tc.wantRefused)
			}
			want := "approved"
			if tc.wantRefused {
				want = "draft"
			}
			if got := cv.Detail().State; got != want {
				t.Errorf("state = %q, want %q", got, want)
			}
		})
	}
}

// slowModel blocks each evaluation until it is cancelled or released.
type slowModel struct {
	release chan struct{}
	mu      sync.Mutex
	started []float64
}

func (m *slowModel) Families(ctx context.Context, p viewmodel.ModelParams) (viewmodel.Families, error) {
	m.mu.Lock()
	m.started = append(m.started, p.FreqHz)
	m.mu.Unlock()
	select {
	case <-ctx.Done():
		return viewmodel.Families{}, ctx.Err()
	case <-m.release:
	}
	return viewmodel.Families{Operating: complex(0, p.FreqHz)}, nil
}

func (m *slowModel) DepthProfile(ctx context.Context, p viewmodel.ModelParams) (viewmodel.DepthProfile, error) {
	return viewmodel.DepthProfile{}, ctx.Err()
}

func (m *slowModel) Advice(p viewmodel.ModelParams) (viewmodel.Advice, error) {
	return viewmodel.Advice{}, nil
}

func TestExplorerCancelsSupersededEvaluations(t *testing.T) {
	t.Parallel()
	m := &slowModel{release: make(chan struct{})}
	ex := viewmodel.NewExplorer(m, viewmodel.ModelParams{FreqHz: 1}, serial())
	ex.Evaluate()
	for f := 2.0; f <= 5; f++ {
		p := ex.Params()
		p.FreqHz = f
		ex.Set(p)
	}
	close(m.release)
	ex.Wait()
	res := ex.Results()
	if res.Err != nil || res.Busy {
		t.Fatalf("err %v, busy %v", res.Err, res.Busy)
	}
	if fam := res.Families; fam.Operating != complex(0, 5) {
		t.Errorf("result from f=%v, want the last (5)", imag(res.Families.Operating))
	}
}

func TestParseRole(t *testing.T) {
	t.Parallel()
	for in, want := range map[string]viewmodel.Role{"Level3": viewmodel.Level3, "l2": viewmodel.Level2, "QA": viewmodel.QA} {
		if got, err := viewmodel.ParseRole(in); err != nil || got != want {
			t.Errorf("ParseRole(%q) = %q, %v; want %q", in, got, err, want)
		}
	}
	if _, err := viewmodel.ParseRole("boss"); err == nil || !strings.Contains(err.Error(), "expected level1") {
		t.Errorf("ParseRole(boss) error %v", err)
	}
	if err := (viewmodel.Actor{Role: viewmodel.Level2}).Validate(); err == nil {
		t.Error("actor without a name validated")
	}
}

func TestDecimateEnvelopeEqualsDecimate(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(3, 4))
	n := 50_003
	z := make([]complex128, n)
	axis := make([]float64, n)
	x := 0.0
	for i := range z {
		z[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		x += 0.0005 + 0.001*rng.Float64() // uneven but increasing positions
		axis[i] = x
	}
	env := viewmodel.NewEnvelope(z)
	for _, tc := range []struct {
		name     string
		lo, hi   int
		from, to float64
		cols     int
	}{
		{"whole scan", 0, n, axis[0], axis[n-1], 997},
		{"inner range", 1234, 40000, axis[1234], axis[39999], 640},
		{"view wider than the data", 100, 20000, axis[0] - 1, axis[n-1] + 1, 300},
	} {
		t.Run(tc.name, func(t *testing.T) {
			for _, p := range []viewmodel.Part{viewmodel.PartX, viewmodel.PartY} {
				want := viewmodel.Decimate(nil, z, axis, p, tc.lo, tc.hi, tc.from, tc.to, tc.cols)
				got := viewmodel.DecimateEnvelope(nil, env, z, axis, p, tc.lo, tc.hi, tc.from, tc.to, tc.cols)
				for c := range want {
					if got[c] != want[c] {
						t.Fatalf("%v column %d: got %+v, want %+v (Decimate)", p, c, got[c], want[c])
					}
				}
			}
		})
	}
}

// FuzzParseRole: any text parses to a known role or an error naming the
// accepted roles, and every accepted role parses back to itself.
func FuzzParseRole(f *testing.F) {
	for _, s := range []string{"level1", "L2", " iii ", "QA", "boss", "", "level4"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		r, err := viewmodel.ParseRole(s)
		if err != nil {
			if !strings.Contains(err.Error(), "expected level1, level2, level3 or qa") {
				t.Fatalf("ParseRole(%q) error %q does not list the roles", s, err)
			}
			return
		}
		if back, err := viewmodel.ParseRole(string(r)); err != nil || back != r {
			t.Fatalf("ParseRole(%q) = %q, which parses back to %q, %v", s, r, back, err)
		}
	})
}
