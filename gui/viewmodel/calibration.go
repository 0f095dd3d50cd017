package viewmodel

import (
	"context"
	"errors"
	"fmt"
)

// Calibrations is the calibration view's state: the calibrations of the
// inspection and the one under review.
type Calibrations struct {
	worker
	src Source
	// OnChange is called on the UI thread after the state changed.
	OnChange func()

	list     []CalibrationSummary
	detail   *CalibrationDetail
	events   []AuditEvent
	message  string
	refused  bool
	isError  bool
	ctx      context.Context
	loadStop context.CancelFunc
}

// NewCalibrations returns the calibration state over src; post runs its
// argument on the UI thread.
func NewCalibrations(src Source, post func(func())) *Calibrations {
	return &Calibrations{worker: worker{post: post}, src: src, ctx: context.Background()}
}

func (c *Calibrations) changed() {
	if c.OnChange != nil {
		c.OnChange()
	}
}

// Load reads the list of calibrations and opens the first.
func (c *Calibrations) Load() {
	var list []CalibrationSummary
	var err error
	c.goAndPost(func() { list, err = c.src.Calibrations(c.ctx) }, func() {
		if err != nil {
			c.message, c.isError = fmt.Sprintf("reading calibrations: %v", err), true
			c.changed()
			return
		}
		c.list = list
		c.changed()
		if c.detail == nil && len(list) > 0 {
			c.Open(list[0].ID)
		}
	})
}

// List returns the calibrations of the inspection.
func (c *Calibrations) List() []CalibrationSummary { return c.list }

// Detail returns the calibration under review, or nil.
func (c *Calibrations) Detail() *CalibrationDetail { return c.detail }

// Events returns the audit events of the calibration under review.
func (c *Calibrations) Events() []AuditEvent { return c.events }

// Message returns the latest status line, whether it is an error, and
// whether it is a refusal for the declared role.
func (c *Calibrations) Message() (msg string, isError, refused bool) {
	return c.message, c.isError, c.refused
}

// Open loads one calibration with its curves, located flaws and checks.
func (c *Calibrations) Open(id string) {
	if c.loadStop != nil {
		c.loadStop()
	}
	ctx, stop := context.WithCancel(c.ctx)
	c.loadStop = stop
	var d *CalibrationDetail
	var ev []AuditEvent
	var err error
	c.goAndPost(func() {
		d, err = c.src.Calibration(ctx, id)
		if err == nil {
			ev, err = c.src.Events(ctx, id)
		}
	}, func() {
		if ctx.Err() != nil {
			return
		}
		if err != nil {
			c.message, c.isError, c.refused = fmt.Sprintf("opening calibration %s: %v", id, err), true, false
			c.changed()
			return
		}
		c.detail, c.events = d, ev
		c.changed()
	})
}

// CanApprove reports whether the declared role may approve calibrations.
// The store decides; this only greys out the button for other roles.
func (c *Calibrations) CanApprove() bool { return c.src.Actor().Role == Level3 }

// Approve asks the store to approve the calibration under review. A
// refusal for the declared role is reported with the store's message.
func (c *Calibrations) Approve(reason string) {
	if c.detail == nil {
		c.message, c.isError, c.refused = "no calibration open", true, false
		c.changed()
		return
	}
	id := c.detail.ID
	var err error
	c.goAndPost(func() { err = c.src.Approve(c.ctx, id, reason) }, func() {
		switch {
		case errors.Is(err, ErrNotPermitted):
			c.message, c.isError, c.refused = fmt.Sprintf("approval refused: %v", err), true, true
		case err != nil:
			c.message, c.isError, c.refused = fmt.Sprintf("approving %s: %v", id, err), true, false
		default:
			c.message, c.isError, c.refused = fmt.Sprintf("%s approved by %s", id, c.src.Actor()), false, false
		}
		c.changed()
		if err == nil {
			c.Load()
			c.Open(id)
		}
	})
}
