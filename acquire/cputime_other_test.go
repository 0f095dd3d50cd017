//go:build !unix

package acquire

// processCPUSeconds is not measured on this system.
func processCPUSeconds() float64 { return 0 }
