package calibrate

import (
	"fmt"
	"math"
	"regexp"
	"time"
)

// ParseStandard decodes and validates a reference-standard file held in
// data; name is used in error messages. The format is described in
// docs/standard.md. Errors are *FileError values naming the field and the
// flaw.
func ParseStandard(name string, data []byte) (*Standard, error) {
	var s Standard
	if err := decodeStrict(name, data, &s); err != nil {
		return nil, err
	}
	// as_built_depth_pct is required even where it is 0: decode its
	// presence separately (the Standard type keeps plain float64 fields).
	var presence struct {
		Flaws []struct {
			AsBuilt *float64 `json:"as_built_depth_pct"`
		} `json:"flaws"`
	}
	if err := decodeLoose(name, data, &presence); err != nil {
		return nil, err
	}
	for i, f := range presence.Flaws {
		if f.AsBuilt == nil {
			id := ""
			if i < len(s.Flaws) {
				id = s.Flaws[i].ID
			}
			return nil, fieldErr(name, fmt.Sprintf("flaws[%d] (id %q).as_built_depth_pct", i, id), "missing: every flaw needs its as-built depth from the certificate")
		}
	}
	if err := s.validate(name); err != nil {
		return nil, err
	}
	return &s, nil
}

// Validate reports the first problem of s as a *FileError (File empty):
// a missing serial, impossible tube dimensions, no flaws, a duplicate or
// empty flaw ID, an unknown flaw type or origin, a depth outside 0–100 %TW,
// or a flaw outside the standard's length.
func (s *Standard) Validate() error { return s.validate("standard") }

var dateRE = regexp.MustCompile(`^\d{4}-\d{2}-\d{2}$`)

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func (s *Standard) validate(file string) error {
	switch {
	case s.Serial == "":
		return fieldErr(file, "serial", "missing: the standard's serial number is required")
	case !finite(s.OuterDiameterM) || s.OuterDiameterM <= 0:
		return fieldErr(file, "outer_diameter_m", "%v: expected a positive diameter in metres", s.OuterDiameterM)
	case !finite(s.WallM) || s.WallM <= 0 || s.WallM >= s.OuterDiameterM/2:
		return fieldErr(file, "wall_m", "%v: expected a positive wall thinner than half the outer diameter (%v m)", s.WallM, s.OuterDiameterM)
	case !finite(s.LengthM) || s.LengthM <= 0:
		return fieldErr(file, "length_m", "%v: expected a positive length in metres", s.LengthM)
	case len(s.Flaws) == 0:
		return fieldErr(file, "flaws", "empty: a standard needs at least one flaw")
	}
	if s.CertificateDate != "" {
		if _, err := time.Parse("2006-01-02", s.CertificateDate); err != nil || !dateRE.MatchString(s.CertificateDate) {
			return fieldErr(file, "certificate_date", "%q: expected a date YYYY-MM-DD", s.CertificateDate)
		}
	}
	seen := make(map[string]int, len(s.Flaws))
	for i, f := range s.Flaws {
		at := func(field string) string { return fmt.Sprintf("flaws[%d] (id %q).%s", i, f.ID, field) }
		if f.ID == "" {
			return fieldErr(file, fmt.Sprintf("flaws[%d].id", i), "missing: every flaw needs an ID unique within the standard")
		}
		if j, dup := seen[f.ID]; dup {
			return fieldErr(file, at("id"), "duplicate: also used by flaws[%d]", j)
		}
		seen[f.ID] = i
		switch f.Type {
		case ThroughHole, FlatBottomHole, Groove, Notch, SupportRing, WearScar:
		default:
			return fieldErr(file, at("type"), "%q: expected one of through-hole, flat-bottom-hole, groove, notch, support-ring, wear-scar", f.Type)
		}
		switch f.Origin {
		case OD, ID:
		case "":
			if f.Type == FlatBottomHole || f.Type == Groove || f.Type == Notch || f.Type == WearScar {
				return fieldErr(file, at("origin"), "missing: a %s needs its origin, OD or ID", f.Type)
			}
		default:
			return fieldErr(file, at("origin"), "%q: expected OD or ID", f.Origin)
		}
		for _, d := range []struct {
			name string
			v    float64
		}{{"nominal_depth_pct", f.NominalDepthPct}, {"as_built_depth_pct", f.AsBuiltDepthPct}} {
			if !finite(d.v) || d.v < 0 || d.v > 100 {
				return fieldErr(file, at(d.name), "%v: expected a depth from 0 to 100 %%TW", d.v)
			}
		}
		if f.Type == ThroughHole && f.AsBuiltDepthPct != 100 {
			return fieldErr(file, at("as_built_depth_pct"), "%v: a through-wall hole is 100 %%TW deep", f.AsBuiltDepthPct)
		}
		if !finite(f.AxialPositionM) || f.AxialPositionM < 0 || f.AxialPositionM > s.LengthM {
			return fieldErr(file, at("axial_position_m"), "%v: expected a position inside the standard, 0 to %v m", f.AxialPositionM, s.LengthM)
		}
		for _, d := range []struct {
			name string
			v    float64
		}{{"diameter_m", f.DiameterM}, {"width_m", f.WidthM}, {"thickness_m", f.ThicknessM}} {
			if !finite(d.v) || d.v < 0 {
				return fieldErr(file, at(d.name), "%v: expected a non-negative length in metres", d.v)
			}
		}
		for k, a := range f.AnglesDeg {
			if !finite(a) || a < -360 || a > 360 {
				return fieldErr(file, fmt.Sprintf("%s[%d]", at("angles_deg"), k), "%v: expected an angle from -360 to 360 degrees", a)
			}
		}
	}
	return nil
}

// Flaw returns the flaw with the given ID, or nil.
func (s *Standard) Flaw(id string) *Flaw {
	for i := range s.Flaws {
		if s.Flaws[i].ID == id {
			return &s.Flaws[i]
		}
	}
	return nil
}

// LoadStandard reads and validates a reference-standard file.
func LoadStandard(path string) (*Standard, error) {
	b, err := readFile(path)
	if err != nil {
		return nil, err
	}
	return ParseStandard(path, b)
}

// SaveStandard validates s and writes it to path as indented JSON.
func SaveStandard(path string, s *Standard) error {
	if err := s.validate(path); err != nil {
		return err
	}
	return writeFileJSON(path, s)
}
