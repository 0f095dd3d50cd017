package calibrate

import (
	"errors"
	"fmt"
)

// ConductivitySetup is the procedure side of a conductivity measurement
// set-up: the certified reference blocks the instrument is set on, the
// frequency, how far a block's reading may stray from its certificate,
// and how often the blocks are re-checked. The coil-model fit that turns
// readings into conductivity belongs to the impedance package; this
// record only says what the procedure requires of it. Conductivities are
// in S/m (%IACS only at the edges: 100 %IACS = 58.0 MS/m).
type ConductivitySetup struct {
	FreqHz float64             `json:"freq_hz"`
	Blocks []ConductivityBlock `json:"blocks"`
	// TolerancePct is the largest allowed difference between a block's
	// reading and its certified value, in percent of the certified value.
	TolerancePct float64 `json:"tolerance_pct"`
	// RecheckIntervalS is the longest time between block checks, in seconds.
	RecheckIntervalS float64 `json:"recheck_interval_s"`
}

// ConductivityBlock is one certified conductivity reference block.
type ConductivityBlock struct {
	ID               string  `json:"id"`
	Material         string  `json:"material,omitempty"`
	CertifiedSPerM   float64 `json:"certified_s_per_m"`
	UncertaintySPerM float64 `json:"uncertainty_s_per_m,omitempty"`
	CertificateID    string  `json:"certificate_id,omitempty"`
}

func (c *ConductivitySetup) validate() error {
	switch {
	case !pos(c.FreqHz):
		return fmt.Errorf("freq_hz %v: expected a positive frequency", c.FreqHz)
	case len(c.Blocks) < 2:
		return errors.New("blocks: at least two blocks are needed to bracket the range")
	case !pos(c.TolerancePct):
		return fmt.Errorf("tolerance_pct %v: expected a positive percentage", c.TolerancePct)
	case !pos(c.RecheckIntervalS):
		return fmt.Errorf("recheck_interval_s %v: expected a positive time in seconds", c.RecheckIntervalS)
	}
	seen := map[string]bool{}
	for i, b := range c.Blocks {
		if b.ID == "" || seen[b.ID] {
			return fmt.Errorf("blocks[%d].id %q: expected a unique, non-empty ID", i, b.ID)
		}
		seen[b.ID] = true
		if !pos(b.CertifiedSPerM) {
			return fmt.Errorf("blocks[%d] (id %q).certified_s_per_m %v: expected a positive conductivity", i, b.ID, b.CertifiedSPerM)
		}
		if !finite(b.UncertaintySPerM) || b.UncertaintySPerM < 0 {
			return fmt.Errorf("blocks[%d] (id %q).uncertainty_s_per_m %v: expected a non-negative value", i, b.ID, b.UncertaintySPerM)
		}
	}
	return nil
}

// Validate reports the first problem of the set-up.
func (c *ConductivitySetup) Validate() error { return c.validate() }
