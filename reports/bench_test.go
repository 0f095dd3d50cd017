package reports_test

import (
	"fmt"
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

// BenchmarkWritePDFManyFigures writes the fixture report with 40
// reportable indications, each with its signal window: 81 figures (one
// curve, an impedance plane and a strip chart per indication).
func BenchmarkWritePDFManyFigures(b *testing.B) {
	_, in := fixture(b)
	var rep []reports.Indication
	for _, d := range in.Indications {
		if d.Reportable() && d.Window != nil {
			rep = append(rep, d)
		}
	}
	if len(rep) == 0 {
		b.Fatal("fixture has no reportable indication with a signal window")
	}
	in.Indications = in.Indications[:0]
	for i := range 40 {
		d := rep[i%len(rep)]
		d.ID = fmt.Sprintf("%s-%d", d.ID, i)
		in.Indications = append(in.Indications, d)
	}
	b.ReportAllocs()
	for b.Loop() {
		if err := reports.WritePDF(io.Discard, in); err != nil {
			b.Fatal(err)
		}
	}
}
