package dsp

import (
	"crypto/sha256"
	"encoding/hex"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"whorl/acquire"
)

func chainScan() *acquire.Scan {
	n := 400
	s := &acquire.Scan{SampleRateHz: 1000, Meta: acquire.Meta{Component: "R01C001", ProbeSpeedMPS: 0.5}}
	a := acquire.Channel{Name: "abs-400k", FreqHz: 4e5, Mode: acquire.Absolute}
	b := acquire.Channel{Name: "abs-100k", FreqHz: 1e5, Mode: acquire.Absolute}
	c := acquire.Channel{Name: "abs2-400k", FreqHz: 4e5, Mode: acquire.Absolute}
	for i := range n {
		tm := float64(i) / 1000
		s.TimeS = append(s.TimeS, tm)
		a.Samples = append(a.Samples, complex(math.Sin(2*math.Pi*5*tm), 0.1))
		b.Samples = append(b.Samples, complex(0.2+0.3*math.Sin(2*math.Pi*5*tm), math.Cos(2*math.Pi*5*tm)))
		c.Samples = append(c.Samples, complex(0.5, math.Sin(2*math.Pi*3*tm)))
	}
	s.Channels = []acquire.Channel{a, b, c}
	return s
}

func TestChainApply(t *testing.T) {
	t.Parallel()
	src := `{"version":1,"name":"bobbin standard","coil_length_m":0.002,"steps":[
	 {"op":"lowpass","order":4,"cutoff_hz":100},
	 {"op":"median","width":3,"channels":["abs-400k"]},
	 {"op":"null","start":0,"end":10},
	 {"op":"rotate","angle_deg":90,"channels":["abs-100k"]},
	 {"op":"gain","factor":2,"channels":["abs-100k"],"output":"abs-100k-x2"},
	 {"op":"differential","a":"abs-400k","b":"abs2-400k","output":"diff-400k"},
	 {"op":"resample","step_m":0.001}
	]}`
	c, err := ParseChain([]byte(src))
	if err != nil {
		t.Fatal(err)
	}
	in := chainScan()
	keep := append([]complex128(nil), in.Channels[0].Samples...)
	out, warns, err := c.ApplyWarn(in)
	if err != nil {
		t.Fatal(err)
	}
	for i := range keep {
		if in.Channels[0].Samples[i] != keep[i] {
			t.Fatal("input samples changed")
		}
	}
	// 100 Hz low-pass vs flaw band 0.5 m/s ÷ 2 mm = 250 Hz: a warning.
	if len(warns) != 1 || !strings.Contains(out.Meta.Extra["chain_warnings"], "250 Hz") {
		t.Errorf("warnings %q, want the flaw-band warning", warns)
	}
	if len(out.Channels) != 5 || out.Channel("abs-100k-x2") == nil || out.Channel("diff-400k") == nil {
		t.Errorf("channels %s", channelNames(out))
	}
	if out.AxialStepM != 0.001 || out.PositionM == nil {
		t.Errorf("not resampled: step %v", out.AxialStepM)
	}
	b, sum, _ := c.Canonical()
	h := sha256.Sum256([]byte(out.Meta.Extra["chain"]))
	if out.Meta.Extra["chain"] != string(b) || sum != hex.EncodeToString(h[:]) || ChainSHA256(out) != sum {
		t.Errorf("recorded chain/hash do not match: %q %q", out.Meta.Extra["chain_sha256"], sum)
	}
	// The recorded chain parses back to the same chain.
	c2, err := ParseChain([]byte(out.Meta.Extra["chain"]))
	if err != nil {
		t.Fatal(err)
	}
	if _, s2, _ := c2.Canonical(); s2 != sum {
		t.Errorf("re-parsed chain hash %s, want %s", s2, sum)
	}
}

func TestLoadChainMixFile(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	in := chainScan()
	p, o := in.Channels[0].Samples, in.Channels[1].Samples
	m, err := TrainMix(MixAffine, p, [][]complex128{o}, [][2]int{{0, 200}})
	if err != nil {
		t.Fatal(err)
	}
	m.Primary, m.Others = "abs-400k", []string{"abs-100k"}
	mb, _ := jsonMarshal(m)
	if err := os.WriteFile(filepath.Join(dir, "m.json"), mb, 0o644); err != nil {
		t.Fatal(err)
	}
	cp := filepath.Join(dir, "c.json")
	if err := os.WriteFile(cp, []byte(`{"version":1,"steps":[{"op":"mix","mix_file":"m.json","output":"mix-1"}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	c, err := LoadChain(cp)
	if err != nil {
		t.Fatal(err)
	}
	out, err := c.Apply(in)
	if err != nil {
		t.Fatal(err)
	}
	want := m.Apply(nil, p, [][]complex128{o})
	got := out.Channel("mix-1").Samples
	for i := range want {
		if cmplx.Abs(got[i]-want[i]) != 0 {
			t.Fatalf("sample %d: %v, want %v", i, got[i], want[i])
		}
	}
	if !strings.Contains(out.Meta.Extra["chain"], `"matrices"`) {
		t.Error("recorded chain does not inline the mix")
	}
}

var chainErrorCases = []struct {
	name, src, want string
}{
	{"bad json", `{"version":1,"steps":[`, "line 1"},
	{"unknown key", `{"version":1,"steps":[{"op":"lowpass","order":4,"cutoff":100}]}`, `line 1, column 64: json: unknown field "cutoff"`},
	{"version", `{"version":2,"steps":[{"op":"rotate"}]}`, "version 2"},
	{"unknown op", `{"version":1,"steps":[{"op":"smooth"}]}`, `unknown operation "smooth"`},
	{"no cutoff", `{"version":1,"steps":[{"op":"lowpass","order":4}]}`, "exactly one positive cut-off"},
	{"even width", `{"version":1,"steps":[{"op":"median","width":4}]}`, "width 4"},
	{"output many", `{"version":1,"steps":[{"op":"gain","factor":2,"output":"x"}]}`, "exactly one input channel"},
	{"mix no output", `{"version":1,"steps":[{"op":"mix","mix_file":"m.json"}]}`, "output"},
	{"no steps", `{"version":1,"steps":[]}`, "no steps"},
	{"type", `{"version":1,"steps":[{"op":"lowpass","order":"four"}]}`, "line 1, column"},
}

func TestParseChainErrors(t *testing.T) {
	t.Parallel()
	for _, c := range chainErrorCases {
		_, err := ParseChain([]byte(c.src))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

func TestChainApplyErrors(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ src, want string }{
		{`{"version":1,"steps":[{"op":"lowpass","order":4,"cutoff_hz":600}]}`, "cut-off 600 Hz"},
		{`{"version":1,"steps":[{"op":"rotate","channels":["abs-1M"]}]}`, `no channel "abs-1M"`},
		{`{"version":1,"steps":[{"op":"lowpass","order":2,"cutoff_per_m":10}]}`, "axially sampled"},
		{`{"version":1,"steps":[{"op":"null","start":10,"end":900}]}`, "10:900"},
	} {
		ch, err := ParseChain([]byte(c.src))
		if err != nil {
			t.Fatal(err)
		}
		_, err = ch.Apply(chainScan())
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.src, err, c.want)
		}
	}
}

func FuzzParseChain(f *testing.F) {
	for _, c := range chainErrorCases {
		f.Add([]byte(c.src))
	}
	f.Add([]byte(`{"version":1,"steps":[{"op":"lowpass","order":4,"cutoff_hz":100},{"op":"resample","step_m":0.001},{"op":"span","start":0,"end":5,"vpp_v":4}]}`))
	f.Add([]byte(`{"version":1,"steps":[{"op":"mix","output":"m","mix":{"form":"affine","primary":"abs-400k","others":["abs-100k"],"matrices":[[[1,0],[0,1]]]}}]}`))
	f.Fuzz(func(t *testing.T, b []byte) {
		c, err := ParseChain(b)
		if err != nil {
			return
		}
		// Oracles: canonical form re-parses to the same hash, and applying
		// to a small scan returns a result or an error, never a panic.
		cb, sum, err := c.Canonical()
		if err != nil {
			t.Fatal(err)
		}
		c2, err := ParseChain(cb)
		if err != nil {
			t.Fatalf("canonical chain does not parse: %v\n%s", err, cb)
		}
		if _, s2, _ := c2.Canonical(); s2 != sum {
			t.Fatalf("hash changed on round trip")
		}
		if out, err := c.Apply(chainScan()); err == nil {
			if err := out.Validate(); err != nil {
				t.Fatalf("invalid output scan: %v", err)
			}
		}
	})
}

func TestDocumentedChainParses(t *testing.T) {
	t.Parallel()
	// The example of docs/processing-chain.md.
	c, err := LoadChain("../testdata/dsp/bobbin-chain.json")
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Steps) != 7 || c.CoilLengthM != 0.004 {
		t.Errorf("parsed %d steps, coil length %v", len(c.Steps), c.CoilLengthM)
	}
	doc, err := os.ReadFile("../docs/processing-chain.md")
	if err != nil {
		t.Fatal(err)
	}
	for _, op := range stepOps {
		if !strings.Contains(string(doc), "| `"+op+"` |") {
			t.Errorf("operation %q is not documented in docs/processing-chain.md", op)
		}
	}
}
