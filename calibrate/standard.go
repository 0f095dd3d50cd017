package calibrate

// FlawType names the kind of an artificial flaw on a reference standard.
type FlawType string

// Artificial flaw kinds.
const (
	ThroughHole    FlawType = "through-hole"
	FlatBottomHole FlawType = "flat-bottom-hole"
	Groove         FlawType = "groove"
	Notch          FlawType = "notch"
	SupportRing    FlawType = "support-ring"
	WearScar       FlawType = "wear-scar"
)

// Origin is the surface a flaw starts from: "OD", "ID", or empty where it
// does not apply (through-wall holes, support rings).
type Origin string

// Flaw origins.
const (
	OD Origin = "OD"
	ID Origin = "ID"
)

// Flaw is one artificial flaw of a reference standard, as built.
// Lengths are in metres; depths in percent of wall thickness (%TW).
type Flaw struct {
	ID              string    `json:"id"` // unique within the standard, e.g. "FBH-40"
	Type            FlawType  `json:"type"`
	Origin          Origin    `json:"origin,omitempty"`
	NominalDepthPct float64   `json:"nominal_depth_pct"`
	AsBuiltDepthPct float64   `json:"as_built_depth_pct"`
	DiameterM       float64   `json:"diameter_m,omitempty"`
	WidthM          float64   `json:"width_m,omitempty"`
	AxialPositionM  float64   `json:"axial_position_m"`      // centre, from the standard's reference end
	AnglesDeg       []float64 `json:"angles_deg,omitempty"`  // circumferential position of each hole; len = count
	ThicknessM      float64   `json:"thickness_m,omitempty"` // support rings
}

// Standard is a reference (calibration) standard: its identity, the tube
// it is made of, and each artificial flaw as built.
type Standard struct {
	Serial          string  `json:"serial"`
	Material        string  `json:"material"`
	Heat            string  `json:"heat,omitempty"`
	OuterDiameterM  float64 `json:"outer_diameter_m"`
	WallM           float64 `json:"wall_m"`
	LengthM         float64 `json:"length_m"`
	CertificateID   string  `json:"certificate_id"`
	CertificateDate string  `json:"certificate_date"` // YYYY-MM-DD
	CodeEdition     string  `json:"code_edition,omitempty"`
	Flaws           []Flaw  `json:"flaws"`
}
