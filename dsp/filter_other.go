//go:build !amd64

package dsp

// filterPair runs the sections p then q (states zp, zq) over x into dst
// in one loop, with the operations of filterState's single-section loop.
func filterPair(p, q Section, dst, x []complex128, zp, zq *[2]complex128) {
	filterPairGo(p, q, dst, x, zp, zq)
}
