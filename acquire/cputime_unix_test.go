//go:build unix

package acquire

import "syscall"

// processCPUSeconds returns the user plus system CPU time of the process,
// so that benchmarks on a shared machine can report throughput per CPU
// second as well as per wall-clock second.
func processCPUSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	tv := func(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)*1e-6 }
	return tv(ru.Utime) + tv(ru.Stime)
}
