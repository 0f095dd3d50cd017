package store

import (
	"encoding/hex"
	"fmt"
	"math"
	"time"
	"unicode/utf8"
)

// Limits on stored text, in bytes.
const (
	maxIDBytes   = 200
	maxTextBytes = 8000
)

// checkID checks an identifier or name: present, valid UTF-8, no control
// characters, no surrounding spaces, at most maxIDBytes.
func checkID(field, s string) error {
	if s == "" {
		return fmt.Errorf("%s is empty", field)
	}
	if len(s) > maxIDBytes {
		return fmt.Errorf("%s is %d bytes long; at most %d allowed", field, len(s), maxIDBytes)
	}
	if s[0] == ' ' || s[len(s)-1] == ' ' {
		return fmt.Errorf("%s %q has leading or trailing spaces", field, s)
	}
	return checkChars(field, s, false)
}

// checkText checks free text (comments, reasons, locations): valid UTF-8,
// no control characters other than tab and newline, at most maxTextBytes.
// Empty text is allowed.
func checkText(field, s string) error {
	if len(s) > maxTextBytes {
		return fmt.Errorf("%s is %d bytes long; at most %d allowed", field, len(s), maxTextBytes)
	}
	return checkChars(field, s, true)
}

func checkChars(field, s string, multiline bool) error {
	for i, r := range s {
		if r == utf8.RuneError {
			if _, n := utf8.DecodeRuneInString(s[i:]); n == 1 {
				return fmt.Errorf("%s has invalid UTF-8 at byte %d", field, i)
			}
		}
		if multiline && (r == '\n' || r == '\t') {
			continue
		}
		if r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0) {
			return fmt.Errorf("%s has control character %U at byte %d", field, r, i)
		}
	}
	return nil
}

func checkFinite(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("%s is %v; want a finite number", field, v)
	}
	return nil
}

func checkHexSHA256(field, s string) error {
	b, err := hex.DecodeString(s)
	if err != nil || len(b) != 32 || s != hex.EncodeToString(b) {
		return fmt.Errorf("%s %q is not a lower-case hex SHA-256 (64 digits)", field, s)
	}
	return nil
}

func firstErr(errs ...error) error {
	for _, e := range errs {
		if e != nil {
			return e
		}
	}
	return nil
}

func (insp *Inspection) validate() error {
	return firstErr(
		checkID("inspection id", insp.ID),
		checkID("site", insp.Site),
		checkID("component", insp.Component),
		checkID("procedure", insp.Procedure),
		checkText("procedure revision", insp.ProcedureRev),
		checkText("code edition", insp.CodeEdition),
		checkText("equipment", insp.Equipment),
		checkText("probe", insp.Probe),
		checkText("reference standard serial", insp.ReferenceSerial),
	)
}

func (p *Person) validate() error {
	if err := checkID("person name", p.Name); err != nil {
		return err
	}
	if _, err := ParseRole(string(p.Role)); err != nil {
		return fmt.Errorf("person %s: %w", quote(p.Name), err)
	}
	if err := checkText("certification level", p.CertLevel); err != nil {
		return err
	}
	if p.CertExpiry == "" {
		if p.Role.certified() {
			return fmt.Errorf("person %s (%s): certificate expiry date is required", quote(p.Name), p.Role)
		}
		return nil
	}
	if _, err := time.Parse(time.DateOnly, p.CertExpiry); err != nil {
		return fmt.Errorf("person %s: certificate expiry %q is not a date YYYY-MM-DD", quote(p.Name), p.CertExpiry)
	}
	return nil
}

func (ind *Indication) validate(i int) error {
	pre := fmt.Sprintf("indication %d", i)
	err := firstErr(
		checkID(pre+" channel", ind.Channel),
		checkText(pre+" location", ind.Location),
		checkText(pre+" class", ind.Class),
		checkText(pre+" method", ind.Method),
		checkText(pre+" comment", ind.Comment),
		checkFinite(pre+" axial position", ind.AxialM),
		checkFinite(pre+" Vpp", ind.VppV),
		checkFinite(pre+" phase", ind.PhaseRad),
	)
	if err != nil {
		return err
	}
	if ind.StartSample < 0 || ind.EndSample <= ind.StartSample {
		return fmt.Errorf("%s: window [%d, %d) is empty or negative", pre, ind.StartSample, ind.EndSample)
	}
	if ind.VppV < 0 {
		return fmt.Errorf("%s: Vpp %g V is negative", pre, ind.VppV)
	}
	if ind.DepthPct != nil {
		if err := checkFinite(pre+" depth", *ind.DepthPct); err != nil {
			return err
		}
	}
	if ind.Uncertainty != nil {
		if err := checkFinite(pre+" depth uncertainty", *ind.Uncertainty); err != nil {
			return err
		}
	}
	switch ind.Source {
	case SourceAuto, SourceAnalyst:
	default:
		return fmt.Errorf("%s: source %q: want auto or analyst", pre, ind.Source)
	}
	switch ind.Status {
	case CallProposed, CallAccepted, CallRejected:
	default:
		return fmt.Errorf("%s: call status %q: want proposed, accepted or rejected", pre, ind.Status)
	}
	if (ind.CurveID == "") != (ind.CurveVersion == 0) {
		return fmt.Errorf("%s: curve %q version %d: give both or neither", pre, ind.CurveID, ind.CurveVersion)
	}
	return nil
}

func (d *Decision) validate() error {
	switch d.Status {
	case CallProposed, CallAccepted, CallRejected:
	default:
		return fmt.Errorf("call status %q: want proposed, accepted or rejected", d.Status)
	}
	return firstErr(checkText("class", d.Class), checkText("comment", d.Comment))
}
