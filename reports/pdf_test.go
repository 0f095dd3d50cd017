package reports_test

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"whorl/reports"
	"whorl/store"
	"whorl/store/storetest"
)

// squash collapses runs of white space, so that text wrapped or laid out
// in columns by pdftotext can be searched.
func squash(s string) string { return strings.Join(strings.Fields(s), " ") }

func TestPDFContent(t *testing.T) {
	t.Parallel()
	_, in := fixture(t)
	pdf := writePDF(t, in)
	if dir := os.Getenv("WHORL_REPORT_OUT"); dir != "" {
		os.WriteFile(filepath.Join(dir, "report.pdf"), pdf, 0o644)
	}
	// Figures are vector graphics: the report holds no image.
	if bytes.Contains(pdf, []byte("/Subtype /Image")) {
		t.Errorf("report holds an image object; want its figures as vector graphics")
	}
	pages := pdfToText(t, pdf)
	if len(pages) < 2 {
		t.Fatalf("%d pages; want at least 2", len(pages))
	}
	for i, pg := range pages {
		want := fmt.Sprintf("page %d of %d", i+1, len(pages))
		if !strings.Contains(pg, "Report "+in.ReportID) || !strings.Contains(pg, want) {
			t.Errorf("page %d lacks the report id %q or %q:\n%s", i+1, in.ReportID, want, pg)
		}
	}
	last := squash(pages[len(pages)-1])
	if !strings.Contains(last, "End of report "+in.ReportID) {
		t.Errorf("last page lacks the end mark %q", "End of report "+in.ReportID)
	}
	all := squash(strings.Join(pages, "\n"))
	for _, want := range []string{
		squash(reports.Caution),
		"Released by qa-records-2 (QA)",
		"Site Korrin Bay Station, unit 2",
		"Procedure WP-ET-07 rev. C",
		"Code edition owner code, 2025 edition",
		"Equipment bench instrument SN 4411",
		"Probe bobbin, differential + absolute, 15.2 mm, SN P-207",
		"Reference standard RS-0193",
		"Software Whorl ",
		"analyst-2c Level II (analyst) ET Level II 2027-03-31",
		"R2C2 not examined restriction at tube-sheet entry, probe would not pass",
		"R3C1 invalid group: re-test",
		"TH-100 phase: 52.5 deg (expected 40 ± 5)",
		"3 indications recorded; 1 reportable",
		// R3C1's group failed its closing check: its results stay out of the table.
		"1 invalid calibration group: re-test",
		"v4 resolution: accepted, class flaw-like, by reviewer-3b (level3)",
	} {
		if !strings.Contains(all, want) {
			t.Errorf("report text lacks %q", want)
		}
	}
	// The indication table: one row per reportable indication, with tube,
	// location, channel, Vpp, phase (deg), %TW, class, method, curve and call.
	rows := []*regexp.Regexp{
		regexp.MustCompile(`S-R1C2/1 R1C2 TSP-2 \+12\.5 mm F1-diff 1\.84 110 52 ± 8 flaw-like phase curve CAL-A v1 accepted`),
	}
	for _, re := range rows {
		if !re.MatchString(all) {
			t.Errorf("indication table lacks a row matching %s", re)
		}
	}
	if strings.Contains(all, "S-R3C1/1 R3C1") {
		t.Errorf("the indication of R3C1 (invalid calibration group) is in the table")
	}
	if strings.Contains(all, "S-R1C2/2 R1C2") {
		t.Errorf("the rejected indication S-R1C2/2 is in the indication table")
	}
}

func TestPDFDraft(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, in := fixture(t)
	if in.Draft {
		t.Fatalf("fixture report is a draft; want released (its newest event is the release)")
	}
	if err := s.As(storetest.ActorOf(storetest.Primary)).Call(ctx, "S-R1C2/2", store.Decision{Status: store.CallProposed}, "reopened"); err != nil {
		t.Fatal(err)
	}
	d, err := reports.FromStore(ctx, s, reports.Options{Now: func() time.Time { return generated }})
	if err != nil {
		t.Fatal(err)
	}
	if !d.Draft || !strings.Contains(d.ReportID, "-D-") {
		t.Fatalf("after a change the report is %q draft=%v; want a draft ID", d.ReportID, d.Draft)
	}
	pages := pdfToText(t, writePDF(t, d))
	for i, pg := range pages {
		if !strings.Contains(pg, "DRAFT, not released") {
			t.Errorf("draft page %d lacks the draft mark", i+1)
		}
	}
	all := squash(strings.Join(pages, "\n"))
	if !strings.Contains(all, "Signal window not supplied") {
		t.Errorf("report without signal windows does not say so")
	}
}

func TestFromStoreRefusesTampered(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s, in := fixture(t)
	_ = in
	if err := storetest.Tamper(s.Path(), "UPDATE indications SET vpp_v = 0.1 WHERE ind_id = 'S-R1C2/1'"); err != nil {
		t.Fatal(err)
	}
	_, err := reports.FromStore(ctx, s, reports.Options{})
	if err == nil || !strings.Contains(err.Error(), "does not verify") {
		t.Errorf("FromStore on a tampered record: %v; want a refusal", err)
	}
}

func TestPDFHostileStrings(t *testing.T) {
	t.Parallel()
	in := handBuilt()
	in.Record.Site = strings.Repeat("W", 3000)
	in.ReportID = strings.Repeat("ID-", 90)
	in.Indications[0].Location = "(unbalanced \\ paren ) \x00 \x1b[31m \u202e\u2066 \xff\xfe 中文 😀"
	in.Indications[0].Comment = strings.Repeat("long comment ", 2000)
	in.Indications[0].Calls = []store.Call{{Version: 1, Kind: store.KindInitial, Comment: strings.Repeat("x", 9000), Reason: "\r\n\t"}}
	pdf := writePDF(t, in)
	if dir := os.Getenv("WHORL_REPORT_OUT"); dir != "" {
		os.WriteFile(filepath.Join(dir, "hostile.pdf"), pdf, 0o644)
	}
	if !bytes.HasPrefix(pdf, []byte("%PDF-")) {
		t.Fatalf("output is not a PDF")
	}
	pages := pdfToText(t, pdf)
	for i, pg := range pages {
		if !strings.Contains(squash(pg), fmt.Sprintf("page %d of %d", i+1, len(pages))) {
			t.Errorf("page %d lacks its page number", i+1)
		}
	}
	if !strings.Contains(squash(strings.Join(pages, " ")), "(unbalanced \\ paren )") {
		t.Errorf("parentheses and backslash not shown as text")
	}
}
