package calibrate_test

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"whorl/calibrate"
	"whorl/calibrate/calibtest"
)

const exampleStandard = "../testdata/calibrate/example-standard.json"

func TestLoadStandardExample(t *testing.T) {
	t.Parallel()
	s, err := calibrate.LoadStandard(exampleStandard)
	if err != nil {
		t.Fatal(err)
	}
	if want := calibtest.Standard(); !reflect.DeepEqual(s, want) {
		t.Errorf("example standard differs from the calibtest fixture:\n got %+v\nwant %+v", s, want)
	}
	// Round trip through SaveStandard.
	path := filepath.Join(t.TempDir(), "std.json")
	if err := calibrate.SaveStandard(path, s); err != nil {
		t.Fatal(err)
	}
	back, err := calibrate.LoadStandard(path)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(back, s) {
		t.Errorf("round trip changed the standard:\n got %+v\nwant %+v", back, s)
	}
}

// mutate returns the example standard's JSON with one edit applied to its
// decoded form.
func mutate(t testing.TB, edit func(m map[string]any)) []byte {
	t.Helper()
	return mutateFile(t, exampleStandard, edit)
}

// mutateFile returns the JSON file at path with one edit applied to its
// decoded form.
func mutateFile(t testing.TB, path string, edit func(m map[string]any)) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	edit(m)
	out, err := json.MarshalIndent(m, "", " ")
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func flaw(m map[string]any, i int) map[string]any { return m["flaws"].([]any)[i].(map[string]any) }

func TestParseStandardErrors(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		data []byte
		want string // substring of the error
	}{
		{"empty file", nil, "empty file"},
		{"truncated", []byte(`{"serial": "A", "flaws": [`), "truncated"},
		{"syntax error with line", []byte("{\n \"serial\": \"A\",\n \"wall_m\": 0.001,,\n}"), "std.json:3:"},
		{"unknown field", []byte(`{"serial": "A", "colour": "red"}`), `unknown field "colour"`},
		{"wrong type", []byte(`{"serial": 12}`), "serial"},
		{"trailing data", append(mutate(t, func(map[string]any) {}), []byte(" {}")...), "after the JSON object"},
		{"missing serial", mutate(t, func(m map[string]any) { delete(m, "serial") }), "serial: missing"},
		{"wall too thick", mutate(t, func(m map[string]any) { m["wall_m"] = 0.01 }), "wall_m"},
		{"duplicate id", mutate(t, func(m map[string]any) { flaw(m, 2)["id"] = "FBH-80" }), `flaws[2] (id "FBH-80").id: duplicate: also used by flaws[1]`},
		{"depth over 100", mutate(t, func(m map[string]any) { flaw(m, 1)["as_built_depth_pct"] = 101.0 }), `flaws[1] (id "FBH-80").as_built_depth_pct: 101: expected a depth from 0 to 100 %TW`},
		{"negative nominal depth", mutate(t, func(m map[string]any) { flaw(m, 3)["nominal_depth_pct"] = -1.0 }), "nominal_depth_pct: -1"},
		{"as-built missing", mutate(t, func(m map[string]any) { delete(flaw(m, 4), "as_built_depth_pct") }), `flaws[4] (id "FBH-20x4").as_built_depth_pct: missing`},
		{"position outside", mutate(t, func(m map[string]any) { flaw(m, 0)["axial_position_m"] = 1.5 }), `flaws[0] (id "TWH-100").axial_position_m: 1.5: expected a position inside the standard, 0 to 1.2 m`},
		{"unknown type", mutate(t, func(m map[string]any) { flaw(m, 0)["type"] = "dimple" }), `type: "dimple"`},
		{"FBH without origin", mutate(t, func(m map[string]any) { delete(flaw(m, 1), "origin") }), "origin: missing"},
		{"bad origin", mutate(t, func(m map[string]any) { flaw(m, 1)["origin"] = "mid" }), `origin: "mid": expected OD or ID`},
		{"through hole not 100", mutate(t, func(m map[string]any) { flaw(m, 0)["as_built_depth_pct"] = 90.0 }), "through-wall hole is 100"},
		{"bad date", mutate(t, func(m map[string]any) { m["certificate_date"] = "11/03/2026" }), "certificate_date"},
		{"no flaws", mutate(t, func(m map[string]any) { m["flaws"] = []any{} }), "flaws: empty"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := calibrate.ParseStandard("std.json", c.data)
			if err == nil {
				t.Fatalf("no error, want one containing %q", c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not contain %q", err, c.want)
			}
			var fe *calibrate.FileError
			if !errors.As(err, &fe) || fe.File != "std.json" {
				t.Errorf("error %v is not a *FileError naming std.json", err)
			}
		})
	}
}

func FuzzParseStandard(f *testing.F) {
	b, err := os.ReadFile(exampleStandard)
	if err != nil {
		f.Fatal(err)
	}
	f.Add(b)
	f.Add([]byte(`{"serial": "A", "flaws": [`))
	f.Add([]byte(`{"serial":"A","outer_diameter_m":0.02,"wall_m":0.001,"length_m":1,"flaws":[{"id":"x","type":"notch","origin":"ID","nominal_depth_pct":1,"as_built_depth_pct":1,"axial_position_m":0.5}]}`))
	f.Add([]byte(`{"serial":"A","outer_diameter_m":1e400}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := calibrate.ParseStandard("fuzz.json", data)
		if err != nil {
			return
		}
		// Whatever parses must validate and survive a round trip.
		if err := s.Validate(); err != nil {
			t.Fatalf("parsed standard fails validation: %v", err)
		}
		out, err := json.Marshal(s)
		if err != nil {
			t.Fatal(err)
		}
		back, err := calibrate.ParseStandard("again.json", out)
		if err != nil {
			t.Fatalf("re-parse of %s: %v", out, err)
		}
		again, err := json.Marshal(back)
		if err != nil {
			t.Fatal(err)
		}
		if string(again) != string(out) {
			t.Fatalf("round trip changed the standard:\n%s\n%s", out, again)
		}
	})
}
