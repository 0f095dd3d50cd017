//go:build race

package acquire

// raceEnabled reports a build with the race detector, whose
// instrumentation changes allocation counts.
const raceEnabled = true
