// Package workflow runs whole inspections: generating the demo, building
// calibrations from the opening calibration scans, checking every
// calibration group, analysing every component, recording everything in
// the inspection database, and writing the reports. The command line and
// the desktop window both call it, so they always do the same thing.
//
// Batches are resumable: a component already recorded in the database is
// skipped, and each component's results are committed in one transaction,
// so an interrupted run loses nothing committed and never records a
// component twice. A file that cannot be read does not stop the batch; it
// is recorded as not examined, with the reason.
package workflow
