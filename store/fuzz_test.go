package store_test

import (
	"context"
	"strings"
	"testing"
	"unicode/utf8"

	"whorl/store"
	"whorl/store/storetest"
)

// FuzzRecordText feeds arbitrary text through the store as a tube ID, a
// person's name and an indication's location and comment. Each action is
// either refused with an error (control characters, invalid UTF-8, empty
// or overlong IDs) or stored and read back byte for byte, and the record
// always verifies.
func FuzzRecordText(f *testing.F) {
	for _, s := range []string{"R12C34", "", " lead", `a,"b"`, "line\nbreak", "nul\x00", "\u202eRTL", "\xff\xfe",
		"中文 😀", strings.Repeat("x", 250), "Ω µ °"} {
		f.Add(s)
	}
	ctx := context.Background()
	s, _ := build(f)
	lead := s.As(storetest.ActorOf(storetest.Lead))
	an := s.As(storetest.ActorOf(storetest.Primary))
	f.Fuzz(func(t *testing.T, text string) {
		if err := an.AddComponents(ctx, []store.Component{{ID: text, Label: text}}); err == nil {
			c, err := s.Component(ctx, text)
			if err != nil || c.ID != text || c.Label != text {
				t.Errorf("component %q read back as %q, %q, %v", text, c.ID, c.Label, err)
			}
		} else if utf8.ValidString(text) && text != "" && !strings.ContainsFunc(text, isControl) &&
			len(text) <= 200 && strings.TrimSpace(text) == text && !strings.Contains(err.Error(), "already registered") {
			t.Errorf("component %q refused: %v", text, err)
		}
		if err := lead.AddPerson(ctx, store.Person{Name: text, Role: store.RoleQA, CertLevel: text}); err == nil {
			ps, err := s.People(ctx)
			found := false
			for _, p := range ps {
				found = found || (p.Name == text && p.CertLevel == text)
			}
			if err != nil || !found {
				t.Errorf("person %q not read back (%v)", text, err)
			}
		}
		ids, err := an.AddIndications(ctx, "S-R1C1", []store.Indication{{Channel: "F1", StartSample: 1, EndSample: 2,
			Location: text, Comment: text, Class: text, Source: store.SourceAnalyst}})
		if err == nil {
			d, err := s.Indication(ctx, ids[0])
			if err != nil || d.Location != text || d.Comment != text || d.Class != text {
				t.Errorf("indication text %q read back as %q, %q, %q, %v", text, d.Location, d.Comment, d.Class, err)
			}
		}
		res, err := s.Verify(ctx)
		if err != nil || !res.OK {
			t.Fatalf("Verify after %q: %+v, %v", text, res, err)
		}
	})
}

func isControl(r rune) bool { return r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0) }
