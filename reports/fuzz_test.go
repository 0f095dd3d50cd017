package reports_test

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"strings"
	"testing"

	"whorl/reports"
	"whorl/store"
)

// hostile are the seed strings of FuzzWriters: quoting and separator
// characters, line breaks, NUL and other controls, bidirectional marks,
// invalid UTF-8, characters outside the PDF font, and very long text.
var hostile = []string{
	"",
	`"`,
	`a,"b",c`,
	"line\nbreak",
	"cr\rlf\r\n",
	"nul\x00byte",
	"esc\x1b[2Jbell\a",
	"\u202eRTL override\u202c and \u200fmark",
	"\xff\xfe invalid \xc3",
	"中文 😀 \U0010FFFF \uFFFE",
	"(paren) \\ backslash ) (",
	" leading and trailing ",
	"=1+2",
	strings.Repeat("long,\"field\"\n", 700),
}

// FuzzWriters feeds hostile strings into the user-supplied fields of a
// report input and checks that the CSV re-reads to the same fields, the
// JSON decodes to the same strings, and the PDF is written without error.
func FuzzWriters(f *testing.F) {
	for _, s := range hostile {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		in := handBuilt()
		in.Record.Site = s
		in.Indications[0].Component = s
		in.Indications[0].Location = s
		in.Indications[1].Comment = s
		in.Indications[1].CalledBy = s
		in.People[0].Name = s
		in.Indications[0].Calls = []store.Call{{Version: 1, Kind: store.KindInitial, Comment: s, Reason: s, By: s}}
		in.Events[0].Reason = s

		// CSV: line breaks inside fields are written as LF (documented);
		// everything else re-reads unchanged.
		var b bytes.Buffer
		if err := reports.WriteIndicationsCSV(&b, in); err != nil {
			t.Fatalf("WriteIndicationsCSV: %v", err)
		}
		recs, err := csv.NewReader(&b).ReadAll()
		if err != nil {
			t.Fatalf("re-reading the CSV: %v", err)
		}
		want := strings.NewReplacer("\r\n", "\n", "\r", "\n").Replace(s)
		col := map[string]int{}
		for i, c := range reports.IndicationColumns {
			col[c] = i
		}
		if len(recs) != 3 {
			t.Fatalf("CSV re-read as %d records; want 3", len(recs))
		}
		for _, c := range []struct {
			row  int
			name string
		}{{1, "component"}, {1, "location"}, {2, "comment"}, {2, "called_by"}} {
			if got := recs[c.row][col[c.name]]; got != want {
				t.Errorf("CSV %s re-read as %q; want %q", c.name, got, want)
			}
		}
		b.Reset()
		if err := reports.WriteRecordCSV(&b, in); err != nil {
			t.Fatalf("WriteRecordCSV: %v", err)
		}
		if recs, err = csv.NewReader(&b).ReadAll(); err != nil || len(recs) != 2 || recs[1][7] != want {
			t.Errorf("record CSV re-read: %v, %d records; want reason %q", err, len(recs), want)
		}

		// JSON: strings decode unchanged, except that invalid UTF-8 bytes
		// become U+FFFD one by one (encoding/json's documented coercion,
		// the same as converting through []rune).
		b.Reset()
		if err := reports.WriteIndicationsJSON(&b, in); err != nil {
			t.Fatalf("WriteIndicationsJSON: %v", err)
		}
		var back reports.IndicationsExport
		if err := json.Unmarshal(b.Bytes(), &back); err != nil {
			t.Fatalf("decoding the JSON: %v", err)
		}
		wantJ := string([]rune(s))
		if back.Indications[1].Comment != wantJ || back.Indications[0].Location != wantJ || back.Indications[0].Calls[0].Reason != wantJ {
			t.Errorf("JSON round trip of %q gave %q, %q, %q", s, back.Indications[1].Comment, back.Indications[0].Location,
				back.Indications[0].Calls[0].Reason)
		}
		b.Reset()
		if err := reports.WriteRecordJSON(&b, in); err != nil || !json.Valid(b.Bytes()) {
			t.Errorf("WriteRecordJSON: %v, valid %v", err, json.Valid(b.Bytes()))
		}

		b.Reset()
		if err := reports.WritePDF(&b, in); err != nil {
			t.Fatalf("WritePDF: %v", err)
		}
		if !bytes.HasPrefix(b.Bytes(), []byte("%PDF-")) {
			t.Fatalf("WritePDF output is not a PDF")
		}
	})
}
