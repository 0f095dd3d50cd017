package calibrate

import (
	"fmt"
	"math"
	"slices"
	"time"
)

// Group statuses.
const (
	GroupValid   = "valid"
	GroupInvalid = "invalid"
	// GroupOpen is a group with no closing calibration yet.
	GroupOpen = "open"
)

// RefCheck compares one reference flaw on one channel between the opening
// and the closing calibration, both measured raw (before set-up), so the
// differences are those the opening set-up would show on the closing scan.
type RefCheck struct {
	Channel string `json:"channel"`
	FlawID  string `json:"flaw_id"`
	// PhaseDiffDeg is closing − opening phase in (−180, 180].
	PhaseDiffDeg float64 `json:"phase_diff_deg"`
	// AmplitudeDiffPct is 100·(closing/opening − 1).
	AmplitudeDiffPct float64 `json:"amplitude_diff_pct"`
	Pass             bool    `json:"pass"`
	// Reason says what failed (empty when Pass).
	Reason string `json:"reason,omitempty"`
}

// GroupCheck is the outcome of checking a closing calibration against the
// opening one under a procedure's tolerances.
type GroupCheck struct {
	OpeningID   string     `json:"opening_id"`
	OpeningHash string     `json:"opening_hash"`
	ClosingID   string     `json:"closing_id"`
	ClosingHash string     `json:"closing_hash"`
	References  []RefCheck `json:"references"`
	// ElapsedS is the time between the opening and closing scans in
	// seconds (NaN-free: 0 with ElapsedKnown false when a start time is missing).
	ElapsedS     float64  `json:"elapsed_s"`
	ElapsedKnown bool     `json:"elapsed_known"`
	MaxElapsedS  float64  `json:"max_elapsed_s"`
	PhaseTolDeg  float64  `json:"phase_tol_deg"`
	AmpTolPct    float64  `json:"amplitude_tol_pct"`
	Pass         bool     `json:"pass"`
	Failures     []string `json:"failures,omitempty"`
}

// CheckClosing checks the closing calibration against the opening one:
// every reference (proc.Check.References, or each set-up's rotation and
// normalisation references) on every set-up channel must agree in phase
// within PhaseTolDeg and in amplitude within AmplitudeTolPct, and the
// closing scan must start no later than MaxElapsed after the opening one
// (FIELD.md §1.5). A missing start time fails the elapsed-time check,
// since the limit cannot be shown to hold.
func CheckClosing(open, closing *Calibration, proc *Procedure) GroupCheck {
	tol := proc.Check
	g := GroupCheck{
		OpeningID: open.ID, OpeningHash: open.Hash, ClosingID: closing.ID, ClosingHash: closing.Hash,
		MaxElapsedS: tol.MaxElapsed(), PhaseTolDeg: tol.PhaseTolDeg, AmpTolPct: tol.AmplitudeTolPct, Pass: true,
	}
	fail := func(format string, a ...any) {
		g.Pass = false
		g.Failures = append(g.Failures, fmt.Sprintf(format, a...))
	}
	if open.StandardSerial != closing.StandardSerial {
		fail("standard %s at closing differs from %s at opening", closing.StandardSerial, open.StandardSerial)
	}
	if open.ProcedureID != closing.ProcedureID || open.ProcedureRevision != closing.ProcedureRevision {
		fail("procedure %s rev %s at closing differs from %s rev %s at opening", closing.ProcedureID, closing.ProcedureRevision, open.ProcedureID, open.ProcedureRevision)
	}
	t0, e0 := time.Parse(time.RFC3339Nano, open.ScanStart)
	t1, e1 := time.Parse(time.RFC3339Nano, closing.ScanStart)
	if e0 == nil && e1 == nil {
		g.ElapsedKnown = true
		g.ElapsedS = t1.Sub(t0).Seconds()
		if g.ElapsedS < 0 {
			fail("closing scan started %s before the opening scan", time.Duration(-g.ElapsedS*float64(time.Second)))
		} else if g.ElapsedS > g.MaxElapsedS {
			fail("%.2f h between opening and closing calibration exceeds the %.2f h limit", g.ElapsedS/3600, g.MaxElapsedS/3600)
		}
	} else {
		fail("the start time of the opening or closing scan is unknown, so the %.2f h limit cannot be checked", g.MaxElapsedS/3600)
	}
	for _, oc := range open.Channels {
		if len(tol.Channels) > 0 && !slices.Contains(tol.Channels, oc.Channel) {
			continue
		}
		cc := closing.Channel(oc.Channel)
		if cc == nil {
			fail("channel %s is missing from the closing calibration", oc.Channel)
			continue
		}
		if om := open.Mix(oc.Channel); om != nil {
			if cm := closing.Mix(oc.Channel); cm == nil || !sameMix(om, cm) {
				fail("mix %s of the closing calibration was trained again instead of reusing the opening mix, so its references cannot be compared", oc.Channel)
				continue
			}
		}
		refs := tol.References
		if len(refs) == 0 {
			refs = dedupe([]string{oc.RotationRef.Reference, oc.NormRef.Reference})
		}
		for _, id := range refs {
			rc := RefCheck{Channel: oc.Channel, FlawID: id, Pass: true}
			om, cm := oc.Measurement(id), cc.Measurement(id)
			switch {
			case om == nil || cm == nil:
				rc.Pass, rc.Reason = false, "reference not measured on both scans"
			case !(om.RawVpp > 0):
				rc.Pass, rc.Reason = false, "reference has no signal at opening"
			default:
				rc.PhaseDiffDeg = wrapSigned(cm.RawPhaseDeg - om.RawPhaseDeg)
				rc.AmplitudeDiffPct = 100 * (cm.RawVpp/om.RawVpp - 1)
				if math.Abs(rc.PhaseDiffDeg) > tol.PhaseTolDeg {
					rc.Pass, rc.Reason = false, fmt.Sprintf("phase moved %.2f°, tolerance ±%g°", rc.PhaseDiffDeg, tol.PhaseTolDeg)
				} else if math.Abs(rc.AmplitudeDiffPct) > tol.AmplitudeTolPct {
					rc.Pass, rc.Reason = false, fmt.Sprintf("amplitude changed %.2f %%, tolerance ±%g %%", rc.AmplitudeDiffPct, tol.AmplitudeTolPct)
				}
			}
			if !rc.Pass {
				fail("channel %s reference %s: %s", oc.Channel, id, rc.Reason)
			}
			g.References = append(g.References, rc)
		}
	}
	return g
}

// ScanRef identifies one examined scan of a calibration group.
type ScanRef struct {
	Component string `json:"component"`
	File      string `json:"file,omitempty"`
	Start     string `json:"start,omitempty"` // RFC 3339
}

// Group is a calibration group: the scans examined between an opening and
// a closing calibration, and the outcome of the closing check. When the
// check fails every scan of the group is invalid: its data are kept, its
// results are kept out of the final report, and Retest lists it for
// re-examination.
type Group struct {
	Name    string      `json:"name"`
	Opening string      `json:"opening"` // calibration ID
	Closing string      `json:"closing,omitempty"`
	Status  string      `json:"status"`
	Check   *GroupCheck `json:"check,omitempty"`
	Scans   []ScanRef   `json:"scans"`
	// Retest lists the components to re-examine (empty for a valid group).
	Retest []string `json:"retest,omitempty"`
	// Note says why the group is invalid, in words for the report.
	Note string `json:"note,omitempty"`
}

// EvaluateGroup builds the group record for scans examined between open
// and closing (closing nil: the group is still open and its results are
// provisional).
func EvaluateGroup(name string, open, closing *Calibration, proc *Procedure, scans []ScanRef) Group {
	g := Group{Name: name, Opening: open.ID, Scans: scans, Status: GroupOpen}
	if closing == nil {
		g.Note = "no closing calibration yet: results are provisional"
		return g
	}
	g.Closing = closing.ID
	chk := CheckClosing(open, closing, proc)
	g.Check = &chk
	if chk.Pass {
		g.Status = GroupValid
		return g
	}
	g.Status = GroupInvalid
	g.Note = "INVALID: closing calibration check failed; re-examine every tube of the group (data kept)"
	for _, s := range scans {
		g.Retest = append(g.Retest, s.Component)
	}
	return g
}

// Reportable reports whether results of the group may enter the final report.
func (g *Group) Reportable() bool { return g.Status == GroupValid }

// sameMix reports whether two mix records have the same coefficients.
func sameMix(a, b *MixRecord) bool {
	if a.Mix == nil || b.Mix == nil || len(a.Mix.Matrices) != len(b.Mix.Matrices) || a.Mix.OffsetV != b.Mix.OffsetV {
		return false
	}
	for k := range a.Mix.Matrices {
		if a.Mix.Matrices[k] != b.Mix.Matrices[k] {
			return false
		}
	}
	return true
}
