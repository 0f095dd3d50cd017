package calibrate_test

import (
	"encoding/json"
	"errors"
	"os"
	"reflect"
	"strings"
	"testing"

	"whorl/calibrate"
)

const exampleProcedure = "../testdata/calibrate/example-procedure.json"

func TestLoadProcedureExample(t *testing.T) {
	t.Parallel()
	p, err := calibrate.LoadProcedure(exampleProcedure)
	if err != nil {
		t.Fatal(err)
	}
	if got := p.ChannelsWithRole(calibrate.RolePrime); !reflect.DeepEqual(got, []string{"400k-diff"}) {
		t.Errorf("prime channels = %v, want [400k-diff]", got)
	}
	if got := p.Check.MaxElapsed(); got != 14400 {
		t.Errorf("max elapsed = %v s, want 14400", got)
	}
	if err := p.CheckStandard(mustStandard(t)); err != nil {
		t.Errorf("procedure against its standard: %v", err)
	}
	var zero calibrate.CheckTolerances
	// 4 h default (ASME V Art. 8 App. II, from memory; FIELD.md §1.5).
	if got := zero.MaxElapsed(); got != 4*3600 {
		t.Errorf("default max elapsed = %v s, want 14400", got)
	}
}

func mustStandard(t testing.TB) *calibrate.Standard {
	t.Helper()
	s, err := calibrate.LoadStandard(exampleStandard)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func mutateProc(t testing.TB, edit func(m map[string]any)) []byte {
	t.Helper()
	return mutateFile(t, exampleProcedure, edit)
}

func obj(v any, path ...any) map[string]any {
	for _, p := range path {
		switch k := p.(type) {
		case string:
			v = v.(map[string]any)[k]
		case int:
			v = v.([]any)[k]
		}
	}
	return v.(map[string]any)
}

func TestParseProcedureErrors(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		edit func(m map[string]any)
		want string
	}{
		{"no id", func(m map[string]any) { delete(m, "id") }, "id: missing"},
		{"no code edition", func(m map[string]any) { delete(m, "code_edition") }, "code_edition: missing"},
		{"bad lobe", func(m map[string]any) { m["lobe"] = "left" }, `lobe: "left"`},
		{"two primes", func(m map[string]any) { obj(m, "channels", 1)["role"] = "prime" }, "exactly one channel with role prime, found 2"},
		{"bad mode", func(m map[string]any) { obj(m, "channels", 0)["mode"] = "bridge" }, `channels[0].mode: "bridge"`},
		{"zero frequency", func(m map[string]any) { obj(m, "channels", 2)["freq_hz"] = 0 }, "channels[2].freq_hz: 0"},
		{"mix unknown input", func(m map[string]any) { obj(m, "mixes", 0)["inputs"] = []any{"50k-diff"} }, `mixes[0].inputs[0]: "50k-diff"`},
		{"mix bad form", func(m map[string]any) { obj(m, "mixes", 0)["form"] = "magic" }, `mixes[0].form: "magic"`},
		{"setup unknown channel", func(m map[string]any) { obj(m, "setups", 0)["channel"] = "nope" }, `setups[0].channel: "nope"`},
		{"rotation angle NaN-like", func(m map[string]any) { obj(m, "setups", 0, "rotation")["angle_deg"] = 400 }, "setups[0].rotation.angle_deg: 400"},
		{"normalisation zero", func(m map[string]any) { obj(m, "setups", 0, "normalisation")["vpp"] = 0 }, "setups[0].normalisation.vpp: 0"},
		{"curve bad type", func(m map[string]any) { obj(m, "setups", 0, "curves", 0)["type"] = "spline" }, `setups[0].curves[0]: type "spline"`},
		{"polynomial too few points", func(m map[string]any) {
			c := obj(m, "setups", 0, "curves", 1)
			c["order"] = 5
		}, "a polynomial of order 5 on phase needs at least 6"},
		{"sizing curve unknown", func(m map[string]any) { obj(m, "setups", 0)["sizing_curve"] = "x" }, `setups[0].sizing_curve: "x"`},
		{"detection on channel without setup", func(m map[string]any) { obj(m, "detection", 0)["channel"] = "100k-diff" }, "detection[0].channel"},
		{"sector without min vpp", func(m map[string]any) { delete(obj(m, "alarms", 0), "min_vpp") }, "alarms[0].min_vpp"},
		{"box around origin", func(m map[string]any) {
			m["alarms"] = []any{map[string]any{"name": "b", "channel": "400k-diff", "kind": "box", "x_min_v": -1, "x_max_v": 1, "y_min_v": -1, "y_max_v": 1}}
		}, "contains the origin"},
		{"landmark fraction", func(m map[string]any) { obj(m, "landmarks")["fraction"] = 1.5 }, "landmarks.fraction: 1.5"},
		{"flaw band reversed", func(m map[string]any) { obj(m, "classification")["flaw_phase_deg"] = []any{170, 8} }, "classification.flaw_phase_deg"},
		{"zone margin negative", func(m map[string]any) { obj(m, "classification")["zone_phase_margin_deg"] = -1 }, "classification.zone_phase_margin_deg: -1"},
		{"zone margin a right angle", func(m map[string]any) { obj(m, "classification")["zone_phase_margin_deg"] = 90 }, "classification.zone_phase_margin_deg: 90"},
		{"zone S/N above min_snr", func(m map[string]any) { obj(m, "classification")["zone_min_snr"] = 4 }, "classification.zone_min_snr: 4: expected 0 (no zone rule) up to min_snr 3"},
		{"reporting over 100", func(m map[string]any) { m["reporting_threshold_pct"] = 120 }, "reporting_threshold_pct: 120"},
		{"negative phase tolerance", func(m map[string]any) { obj(m, "check")["phase_tol_deg"] = -5 }, "check.phase_tol_deg: -5"},
		{"conductivity one block", func(m map[string]any) {
			c := obj(m, "conductivity")
			c["blocks"] = c["blocks"].([]any)[:1]
		}, "conductivity: blocks: at least two"},
		{"unknown key", func(m map[string]any) { m["colour"] = "blue" }, `unknown field "colour"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := calibrate.ParseProcedure("proc.json", mutateProc(t, c.edit))
			if err == nil {
				t.Fatalf("no error, want one containing %q", c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not contain %q", err, c.want)
			}
			var fe *calibrate.FileError
			if !errors.As(err, &fe) || fe.File != "proc.json" {
				t.Errorf("error %v is not a *FileError naming proc.json", err)
			}
		})
	}
}

func TestCheckStandardMissingFlaw(t *testing.T) {
	t.Parallel()
	p, err := calibrate.ParseProcedure("p.json", mutateProc(t, func(m map[string]any) {
		obj(m, "setups", 0, "rotation")["reference"] = "TWH-200"
	}))
	if err != nil {
		t.Fatal(err)
	}
	err = p.CheckStandard(mustStandard(t))
	if err == nil || !strings.Contains(err.Error(), `setups[0].rotation.reference: flaw "TWH-200" is not on standard`) {
		t.Errorf("got %v, want the missing rotation reference named", err)
	}
}

func FuzzParseProcedure(f *testing.F) {
	b, err := os.ReadFile(exampleProcedure)
	if err != nil {
		f.Fatal(err)
	}
	f.Add(b)
	f.Add([]byte(`{"id":"x"}`))
	f.Add([]byte(`{"id":"x","revision":"1","code_edition":"c","channels":[{"name":"a","freq_hz":1,"mode":"absolute","role":"prime"}]}`))
	f.Add(b[:len(b)/2])
	f.Fuzz(func(t *testing.T, data []byte) {
		p, err := calibrate.ParseProcedure("fuzz.json", data)
		if err != nil {
			var fe *calibrate.FileError
			if !errors.As(err, &fe) {
				t.Fatalf("error %v is not a *FileError", err)
			}
			return
		}
		out, err := json.Marshal(p)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := calibrate.ParseProcedure("again.json", out); err != nil {
			t.Fatalf("re-parse of an accepted procedure failed: %v", err)
		}
	})
}
