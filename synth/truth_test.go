package synth

import (
	"bytes"
	"errors"
	"reflect"
	"strings"
	"testing"

	"whorl/calibrate"
)

// TestTruthRoundTrip writes the truth of a few tubes and reads it back.
func TestTruthRoundTrip(t *testing.T) {
	t.Parallel()
	g := mustNew(t, small())
	var all []Truth
	for i := range g.Tubes() {
		tr, err := g.TubeTruth(i)
		if err != nil {
			t.Fatal(err)
		}
		all = append(all, tr...)
	}
	all = append(all, Truth{Component: `R01C001,"x"`, Kind: KindDent, AxialPositionM: 1.25, LengthM: 0.01, Support: 0})
	var buf bytes.Buffer
	if err := WriteTruth(&buf, all); err != nil {
		t.Fatal(err)
	}
	back, err := ReadTruth(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if len(back) != len(all) {
		t.Fatalf("read %d rows, wrote %d", len(back), len(all))
	}
	for i := range all {
		w := all[i]
		// positions are written to 0.1 µm
		if back[i].Component != w.Component || back[i].Kind != w.Kind || back[i].DepthPct != w.DepthPct || back[i].Origin != w.Origin || back[i].Support != w.Support ||
			abs(back[i].AxialPositionM-w.AxialPositionM) > 5e-8 || abs(back[i].LengthM-w.LengthM) > 5e-8 {
			t.Errorf("row %d: read %+v, wrote %+v", i, back[i], w)
		}
	}
	// A second trip is exact.
	var b2 bytes.Buffer
	if err := WriteTruth(&b2, back); err != nil {
		t.Fatal(err)
	}
	again, err := ReadTruth(&b2)
	if err != nil || !reflect.DeepEqual(again, back) {
		t.Errorf("second round trip differs: %v", err)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

const truthHead = "component,kind,axial_position_m,length_m,depth_pct,origin,support\n"

// malformedTruth lists bad truth files with the exact error each must give.
var malformedTruth = []struct {
	name, in, want string
}{
	{"empty", "", "truth line 1: empty file: expected the header row"},
	{"short-header", "component,kind\n", "truth line 1: header has 2 columns: expected component,kind,axial_position_m,length_m,depth_pct,origin,support"},
	{"wrong-header", "component,kind,position,length_m,depth_pct,origin,support\n", `truth line 1: header column 3 is "position": expected "axial_position_m"`},
	{"few-fields", truthHead + "R01C001,od-pit,1.0\n", "truth line 2: 3 fields: expected 7"},
	{"no-component", truthHead + ",od-pit,1.0,0.002,40,OD,-1\n", "truth line 2 column 1 (component): empty: expected a tube identifier"},
	{"bad-kind", truthHead + "R01C001,pit,1.0,0.002,40,OD,-1\n", `truth line 2 column 2 (kind): "pit": expected one of od-pit, support-wear, id-crack, od-crack, dent, ding, deposit, burnish`},
	{"bad-position", truthHead + "R01C001,od-pit,1,0m,0.002,40,OD,-1\n", "truth line 2: 8 fields: expected 7"},
	{"nan-position", truthHead + "R01C001,od-pit,NaN,0.002,40,OD,-1\n", `truth line 2 column 3 (axial_position_m): "NaN": expected a position in metres`},
	{"negative-length", truthHead + "R01C001,od-pit,1.0,-0.002,40,OD,-1\n", "truth line 2 column 4 (length_m): -0.002: expected a length of 0 or more"},
	{"depth-over", truthHead + "R01C001,od-pit,1.0,0.002,140,OD,-1\n", "truth line 2 column 5 (depth_pct): 140: expected a depth from 0 to 100 %TW"},
	{"bad-origin", truthHead + "R01C001,od-pit,1.0,0.002,40,XD,-1\n", `truth line 2 column 6 (origin): "XD": expected OD, ID or empty`},
	{"bad-support", truthHead + "R01C001,od-pit,1.0,0.002,40,OD,-2\n", `truth line 2 column 7 (support): "-2": expected a support index (0 or more) or -1`},
	{"bad-quote", truthHead + "R01C001,\"od-pit,1.0,0.002,40,OD,-1\n", `truth line 2: byte 36: extraneous or missing " in quoted-field`},
	{"inf-depth", truthHead + "R01C001,od-pit,1.0,0.002,+Inf,OD,-1\n", `truth line 2 column 5 (depth_pct): "+Inf": expected a depth in %TW`},
}

// TestReadTruthMalformed checks the exact error for each bad file.
func TestReadTruthMalformed(t *testing.T) {
	t.Parallel()
	for _, c := range malformedTruth {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := ReadTruth(strings.NewReader(c.in))
			if err == nil || err.Error() != c.want {
				t.Errorf("ReadTruth(%q):\n got %v\nwant %s", c.in, err, c.want)
			}
			var te *TruthError
			if err != nil && !errors.As(err, &te) {
				t.Errorf("error %T, want *TruthError", err)
			}
		})
	}
	// A byte-order mark and CRLF line ends are accepted.
	got, err := ReadTruth(strings.NewReader("\ufeff" + strings.ReplaceAll(truthHead, "\n", "\r\n") + "R01C001,od-pit,1.0,0.002,40,OD,-1\r\n"))
	if err != nil || len(got) != 1 || got[0].Origin != calibrate.OD {
		t.Errorf("BOM/CRLF file: %v, %v", got, err)
	}
}

// FuzzReadTruth checks that no input panics and that whatever reads also
// writes and reads back the same.
func FuzzReadTruth(f *testing.F) {
	for _, c := range malformedTruth {
		f.Add(c.in)
	}
	f.Add(truthHead + "R01C001,od-pit,1.0,0.002,40,OD,-1\nR01C002,dent,2.0,0.01,0,,1\n")
	f.Fuzz(func(t *testing.T, in string) {
		got, err := ReadTruth(strings.NewReader(in))
		if err != nil {
			return
		}
		var buf bytes.Buffer
		if err := WriteTruth(&buf, got); err != nil {
			t.Fatalf("write of read rows: %v", err)
		}
		back, err := ReadTruth(&buf)
		if err != nil {
			t.Fatalf("re-read: %v", err)
		}
		if len(back) != len(got) {
			t.Fatalf("re-read %d rows, want %d", len(back), len(got))
		}
	})
}
