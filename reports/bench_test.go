package reports_test

import (
	"io"
	"testing"

	"whorl/reports"
)

// BenchmarkWritePDF writes the fixture report: 4 pages, one curve plot and
// two indications with two figures each.
func BenchmarkWritePDF(b *testing.B) {
	_, in := fixture(b)
	b.ReportAllocs()
	for b.Loop() {
		if err := reports.WritePDF(io.Discard, in); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkWriteIndicationsCSV writes 10,000 indications as CSV.
func BenchmarkWriteIndicationsCSV(b *testing.B) {
	in := handBuilt()
	one := in.Indications[0]
	in.Indications = in.Indications[:0]
	for range 10000 {
		in.Indications = append(in.Indications, one)
	}
	b.ReportAllocs()
	for b.Loop() {
		if err := reports.WriteIndicationsCSV(io.Discard, in); err != nil {
			b.Fatal(err)
		}
	}
}
