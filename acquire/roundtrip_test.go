package acquire

import (
	"bytes"
	"errors"
	"io/fs"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"
)

// extremeValue draws float64 values that stress shortest-form printing:
// subnormals, the largest and smallest normals, negative zero, powers of
// two and random bit patterns.
func extremeValue(rng *rand.Rand) float64 {
	switch rng.IntN(10) {
	case 0:
		return math.SmallestNonzeroFloat64 * float64(rng.IntN(1000)+1) // subnormal
	case 1:
		return -math.MaxFloat64 * rng.Float64()
	case 2:
		return math.Copysign(0, -1)
	case 3:
		return math.Ldexp(1, rng.IntN(2000)-1000)
	case 4:
		return math.Nextafter(2.2250738585072014e-308, 0) // largest subnormal
	case 5:
		return math.MaxFloat64
	}
	for {
		v := math.Float64frombits(rng.Uint64())
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			return v
		}
	}
}

// testScan builds a scan with n samples of extreme values on strictly
// increasing time and decreasing position axes.
func testScan(rng *rand.Rand, n int) *Scan {
	s := &Scan{
		Meta: Meta{
			Component: "R07C112", ProbeID: "BX-0042", ProbeType: "bobbin", ProbeSpeedMPS: 0.3,
			Direction: "pull", Start: time.Date(2026, 3, 14, 8, 30, 0, 123456789, time.UTC),
			CalGroup: "CG-03", Procedure: "WP-ECT-7 rev 2",
			Extra: map[string]string{"operator": "  spaced  ", "note": `has "quotes" and ; , # [x]`, "empty": ""},
		},
		SampleRateHz: 2000, AxialStepM: 0.00015,
		Channels: []Channel{
			{Name: "400k-diff", FreqHz: 400e3, Mode: Differential},
			{Name: "100k abs", FreqHz: 1.0e5 / 3, Mode: Absolute},
		},
	}
	t, p := rng.Float64(), 20.0
	for range n {
		t += rng.ExpFloat64() * 1e-3
		p -= rng.ExpFloat64() * 1e-4
		s.TimeS = append(s.TimeS, t)
		s.PositionM = append(s.PositionM, p)
		for k := range s.Channels {
			s.Channels[k].Samples = append(s.Channels[k].Samples, complex(extremeValue(rng), extremeValue(rng)))
		}
	}
	return s
}

func sameBits(a, b []float64) int {
	if len(a) != len(b) {
		return 0
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return i
		}
	}
	return -1
}

func scansIdentical(t *testing.T, got, want *Scan) {
	t.Helper()
	if i := sameBits(got.TimeS, want.TimeS); i >= 0 {
		t.Fatalf("time differs at %d (len %d vs %d)", i, len(got.TimeS), len(want.TimeS))
	}
	if i := sameBits(got.PositionM, want.PositionM); i >= 0 {
		t.Fatalf("position differs at %d", i)
	}
	if len(got.Channels) != len(want.Channels) {
		t.Fatalf("got %d channels, want %d", len(got.Channels), len(want.Channels))
	}
	for k := range want.Channels {
		g, w := got.Channels[k], want.Channels[k]
		if g.Name != w.Name || g.FreqHz != w.FreqHz || g.Mode != w.Mode {
			t.Fatalf("channel %d: got %q %v %v, want %q %v %v", k, g.Name, g.FreqHz, g.Mode, w.Name, w.FreqHz, w.Mode)
		}
		if len(g.Samples) != len(w.Samples) {
			t.Fatalf("channel %q: %d samples, want %d", w.Name, len(g.Samples), len(w.Samples))
		}
		for i := range w.Samples {
			if math.Float64bits(real(g.Samples[i])) != math.Float64bits(real(w.Samples[i])) ||
				math.Float64bits(imag(g.Samples[i])) != math.Float64bits(imag(w.Samples[i])) {
				t.Fatalf("channel %q sample %d: got %v, want %v", w.Name, i, g.Samples[i], w.Samples[i])
			}
		}
	}
	if got.SampleRateHz != want.SampleRateHz || got.AxialStepM != want.AxialStepM {
		t.Fatalf("rates: got %v Hz %v m, want %v Hz %v m", got.SampleRateHz, got.AxialStepM, want.SampleRateHz, want.AxialStepM)
	}
	gm, wm := got.Meta, want.Meta
	if !gm.Start.Equal(wm.Start) {
		t.Fatalf("start: got %v, want %v", gm.Start, wm.Start)
	}
	gm.Start, wm.Start = time.Time{}, time.Time{}
	if len(wm.Extra) == 0 {
		wm.Extra = nil
	}
	if !reflect.DeepEqual(gm, wm) {
		t.Fatalf("meta: got %+v, want %+v", gm, wm)
	}
}

func TestScanRoundTripBitIdentical(t *testing.T) {
	t.Parallel()
	for _, seed := range []uint64{1, 2, 3} {
		rng := rand.New(rand.NewPCG(seed, 99))
		want := testScan(rng, 500)
		var buf bytes.Buffer
		if err := WriteScan(&buf, want); err != nil {
			t.Fatalf("seed %d: WriteScan: %v", seed, err)
		}
		got, err := ReadScan(bytes.NewReader(buf.Bytes()), "rt.csv")
		if err != nil {
			t.Fatalf("seed %d: ReadScan: %v", seed, err)
		}
		scansIdentical(t, got, want)
		// Writing the read scan again gives the same bytes.
		var buf2 bytes.Buffer
		if err := WriteScan(&buf2, got); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(buf.Bytes(), buf2.Bytes()) {
			t.Fatalf("seed %d: second write differs from the first", seed)
		}
	}
}

func TestScanRoundTripOneAxis(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(7, 7))
	for _, name := range []string{"time only", "position only"} {
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			want := testScan(rng, 10)
			if name == "time only" {
				want.PositionM, want.AxialStepM = nil, 0
			} else {
				want.TimeS, want.SampleRateHz = nil, 0
			}
			want.Meta = Meta{Component: "T1"}
			var buf bytes.Buffer
			if err := WriteScan(&buf, want); err != nil {
				t.Fatal(err)
			}
			got, err := ReadScan(&buf, "one.csv")
			if err != nil {
				t.Fatal(err)
			}
			scansIdentical(t, got, want)
		})
	}
}

func TestRawRoundTripBitIdentical(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(11, 12))
	for _, withRef := range []bool{false, true} {
		want := &RawRecord{
			Meta:         Meta{Component: "STD-01", ProbeID: "BX-0042", Extra: map[string]string{"gain": "12 dB"}},
			Coil:         "diff",
			Mode:         Differential,
			SampleRateHz: 2.5e6,
			ExcitationHz: []float64{100e3, 400e3},
			SlotS:        1e-3,
		}
		p := 0.0
		for range 1000 {
			want.VoltageV = append(want.VoltageV, extremeValue(rng))
			if withRef {
				want.ReferenceV = append(want.ReferenceV, extremeValue(rng))
				p += 1e-5 * (1 + rng.Float64())
				want.PositionM = append(want.PositionM, p)
			}
		}
		var buf bytes.Buffer
		if err := WriteRaw(&buf, want); err != nil {
			t.Fatal(err)
		}
		got, err := ReadRaw(&buf, "raw.csv")
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range []struct {
			name   string
			g, w   []float64
			nilRef bool
		}{{"voltage", got.VoltageV, want.VoltageV, false}, {"reference", got.ReferenceV, want.ReferenceV, !withRef}, {"position", got.PositionM, want.PositionM, !withRef}} {
			if c.nilRef {
				if c.g != nil {
					t.Fatalf("%s: got %d values, want none", c.name, len(c.g))
				}
				continue
			}
			if i := sameBits(c.g, c.w); i >= 0 {
				t.Fatalf("%s differs at %d", c.name, i)
			}
		}
		if got.Coil != want.Coil || got.Mode != want.Mode || got.SampleRateHz != want.SampleRateHz || got.SlotS != want.SlotS ||
			!reflect.DeepEqual(got.ExcitationHz, want.ExcitationHz) || !reflect.DeepEqual(got.Meta, want.Meta) {
			t.Fatalf("header: got %+v, want %+v", got, want)
		}
	}
}

func TestFileRoundTripAndSniff(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(5, 5))
	s := testScan(rng, 20)
	sp := filepath.Join(dir, "scan.csv")
	if err := WriteScanFile(sp, s); err != nil {
		t.Fatal(err)
	}
	got, err := ReadScanFile(sp)
	if err != nil {
		t.Fatal(err)
	}
	scansIdentical(t, got, s)
	rp := filepath.Join(dir, "raw.csv")
	rec := &RawRecord{SampleRateHz: 1e6, ExcitationHz: []float64{2e5}, VoltageV: []float64{0.1, -0.2, 0.3}}
	if err := WriteRawFile(rp, rec); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadRawFile(rp); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path string
		want Kind
	}{{sp, KindScan}, {rp, KindRaw}} {
		k, err := Sniff(c.path)
		if err != nil || k != c.want {
			t.Errorf("Sniff(%s) = %v, %v; want %v", c.path, k, err, c.want)
		}
	}
	// A failed write leaves the existing file and no temporary file.
	bad := testScan(rng, 3)
	bad.Channels[0].Samples[1] = complex(math.NaN(), 0)
	if err := WriteScanFile(sp, bad); err == nil {
		t.Fatal("WriteScanFile with NaN: no error")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 {
		t.Fatalf("folder holds %d entries after a failed write, want 2", len(entries))
	}
	if _, err := ReadScanFile(sp); err != nil {
		t.Fatalf("file damaged by a failed write: %v", err)
	}
	// CreateScanFile refuses to replace a file.
	if err := CreateScanFile(sp, s); !errors.Is(err, fs.ErrExist) {
		t.Fatalf("CreateScanFile over an existing file: %v, want fs.ErrExist", err)
	}
	if err := CreateScanFile(filepath.Join(dir, "new.csv"), s); err != nil {
		t.Fatalf("CreateScanFile: %v", err)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 3 {
		t.Fatalf("folder holds %d entries, want 3 (no temporary files left)", len(entries))
	}
	other := filepath.Join(dir, "other.csv")
	os.WriteFile(other, []byte("a,b\n1,2\n"), 0o644)
	if k, err := Sniff(other); err == nil || k != KindUnknown || !strings.Contains(err.Error(), "other.csv:1:") {
		t.Errorf("Sniff(foreign) = %v, %v; want KindUnknown and an error at line 1", k, err)
	}
}
