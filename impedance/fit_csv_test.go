package impedance

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestReadBlocks(t *testing.T) {
	t.Parallel()
	good := "# certified blocks\nblock_id,conductivity_pct_iacs,u_conductivity_pct_iacs,thickness_mm,material\nRB-1,26.5,0.3,,aluminium\nRB-2,61.9,0.35,inf,aluminium\nRB-3,41.2,0.3,12.5,aluminium\n"
	bs, err := ReadBlocks(strings.NewReader(good), "blocks.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(bs) != 3 || bs[0].ConductivitySPerM != 26.5*58e4 || bs[1].ThicknessM != 0 || bs[2].ThicknessM != 12.5e-3 || bs[0].UConductivitySPerM != 0.3*58e4 {
		t.Errorf("got %+v", bs)
	}
	ms, err := ReadBlocks(strings.NewReader("block_id,conductivity_ms_per_m\nA,17.4\n"), "b.csv")
	if err != nil || ms[0].ConductivitySPerM != 17.4e6 {
		t.Errorf("MS/m column: %+v, %v", ms, err)
	}
	tests := []struct {
		name, in, want string
	}{
		{"empty", "", "b.csv: bad file: empty file"},
		{"unknown column", "block_id,conductivity_pct_iacs,colour\n", `b.csv:1:3 (column "colour"): bad file: unknown column`},
		{"missing column", "block_id\nA\n", `b.csv:1: bad file: missing column`},
		{"not a number", "block_id,conductivity_pct_iacs\nA,forty\n", `b.csv:2:2 (column "conductivity_pct_iacs"): bad file: "forty" is not a finite number`},
		{"NaN", "block_id,conductivity_pct_iacs\nA,NaN\n", `b.csv:2:2`},
		{"negative", "block_id,conductivity_pct_iacs\nA,-3\n", `is not positive`},
		{"duplicate", "block_id,conductivity_pct_iacs\nA,3\nA,4\n", `already defined on line 2`},
		{"short row", "block_id,conductivity_pct_iacs\nA\n", `b.csv:2: bad file: 1 fields; expected 2 fields`},
		{"no rows", "block_id,conductivity_pct_iacs\n", `no blocks`},
		{"duplicate column", "block_id,conductivity_pct_iacs,conductivity_ms_per_m\n", `duplicate column`},
		{"bad quote", "block_id,conductivity_pct_iacs\n\"A,3\n", `b.csv:2`},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := ReadBlocks(strings.NewReader(tc.in), "b.csv")
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want one containing %q", err, tc.want)
			}
			if !errors.Is(err, ErrFileFormat) {
				t.Errorf("error %v does not wrap ErrFileFormat", err)
			}
		})
	}
}

func TestReadReadingsAndJoin(t *testing.T) {
	t.Parallel()
	shims, err := ReadShims(strings.NewReader("shim_id,thickness_um,u_thickness_um\nS50,50.8,0.5\n"), "s.csv")
	if err != nil || shims[0].ThicknessM != 50.8e-6 {
		t.Fatalf("%+v %v", shims, err)
	}
	blocks, _ := ReadBlocks(strings.NewReader("block_id,conductivity_pct_iacs\nA,30\nB,60\n"), "b.csv")
	cal, err := ReadCalReadings(strings.NewReader("block_id,shim_id,freq_khz,x_mv,y_mv\nA,,60,100,-20\nB,S50,60,50,10\nair,,60,0,0\n"), "c.csv")
	if err != nil {
		t.Fatal(err)
	}
	if cal[0].FreqHz != 60e3 || cal[0].V != complex(0.1, -0.02) {
		t.Errorf("got %+v", cal[0])
	}
	pts, err := CalPointsFrom(blocks, shims, cal, "c.csv")
	if err != nil {
		t.Fatal(err)
	}
	if pts[1].ExtraLiftoffM != 50.8e-6 || pts[1].UExtraLiftoffM != 0.5e-6 || pts[2].Specimen.ConductivitySPerM != 0 {
		t.Errorf("got %+v", pts)
	}
	bad, _ := ReadCalReadings(strings.NewReader("block_id,freq_hz,x_v,y_v\nC,6e4,1,2\n"), "c.csv")
	if _, err := CalPointsFrom(blocks, shims, bad, "c.csv"); err == nil || !strings.Contains(err.Error(), `c.csv:2 (column "block_id"): bad file: unknown block "C"`) {
		t.Errorf("unknown block: %v", err)
	}
	spots, err := ReadSpotReadings(strings.NewReader("spot,freq_hz,x_v,y_v,temperature_c,thickness_mm,material\nP1-1,60000,1,2,24.5,3.2,aluminium-alloy\nP1-1,240000,1,2,,,\nP1-2,60000,1,2,,,\n"), "r.csv")
	if err != nil {
		t.Fatal(err)
	}
	g := GroupSpots(spots)
	if len(g) != 2 || len(g[0].Readings) != 2 || g[0].Readings[0].TempC != 24.5 || !math.IsNaN(g[0].Readings[1].TempC) || g[0].Readings[0].ThicknessM != 3.2e-3 {
		t.Errorf("got %+v", g)
	}
	if _, err := ReadSpotReadings(strings.NewReader("spot,freq_hz,x_v,y_v\nA,6e4,1,2\nA,6e4,1,2\n"), "r.csv"); err == nil || !strings.Contains(err.Error(), "already has a reading") {
		t.Errorf("duplicate spot frequency: %v", err)
	}
}

// FuzzReadFiles checks that the readers never panic and that every error
// names the file.
func FuzzReadFiles(f *testing.F) {
	for _, s := range []string{
		"block_id,conductivity_pct_iacs,u_conductivity_pct_iacs,thickness_mm\nRB-1,26.5,0.3,\n",
		"shim_id,thickness_um\nS,50\n",
		"block_id,shim_id,freq_khz,x_v,y_v\nA,,60,1,2\n",
		"spot,freq_hz,x_v,y_v,temperature_c\nP,6e4,1,2,20\n",
		"block_id,conductivity_pct_iacs\n\"A,3\n",
		"",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		check := func(err error) {
			if err != nil && !strings.HasPrefix(err.Error(), "f.csv") {
				t.Errorf("error %q does not name the file", err)
			}
		}
		_, err := ReadBlocks(strings.NewReader(s), "f.csv")
		check(err)
		_, err = ReadShims(strings.NewReader(s), "f.csv")
		check(err)
		_, err = ReadCalReadings(strings.NewReader(s), "f.csv")
		check(err)
		rs, err := ReadSpotReadings(strings.NewReader(s), "f.csv")
		check(err)
		for _, r := range rs {
			if math.IsNaN(real(r.V)) || math.IsInf(imag(r.V), 0) || !(r.FreqHz > 0) {
				t.Errorf("accepted a bad reading %+v", r)
			}
		}
	})
}

// FuzzReadSetup checks that the probe and setup readers never panic, name
// the file in their errors, and that an accepted setup is usable.
func FuzzReadSetup(f *testing.F) {
	f.Add(`{"inner_radius_m":0.001,"outer_radius_m":0.0025,"length_m":0.0015,"turns":200,"liftoff_m":0.0003}`)
	f.Add(`{"format":"whorl-impedance-setup/1","kind":"conductivity","probe":{"inner_radius_m":0.001,"outer_radius_m":0.0025,"length_m":0.0015,"turns":200,"liftoff_m":0.0003},` +
		`"calibration":{"coil":{"InnerRadiusM":0.001,"OuterRadiusM":0.0025,"LengthM":0.0015,"Turns":200},"channels":[{"freq_hz":60000,"gain_v":{"re":1,"im":0},"offset_v":{"re":0,"im":0}}],` +
		`"liftoff_m":0.0003,"coil_scale":1,"params":[],"covariance":[],"noise_v":0.001}}`)
	f.Add(`{"format":"x"}`)
	f.Add(`[`)
	f.Fuzz(func(t *testing.T, s string) {
		if _, err := ReadProbe(strings.NewReader(s), "p.json"); err != nil && !strings.HasPrefix(err.Error(), "p.json") {
			t.Errorf("error %q does not name the file", err)
		}
		st, err := ReadSetup(strings.NewReader(s), "s.json")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "s.json") {
				t.Errorf("error %q does not name the file", err)
			}
			return
		}
		if len(st.Calibration.Channels) == 0 || st.Calibration.Channels[0].Gain == 0 {
			t.Errorf("accepted an unusable setup %+v", st)
		}
	})
}
