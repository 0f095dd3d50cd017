package reports

import (
	"strings"
	"sync"
	"unicode"

	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"golang.org/x/image/font/sfnt"
)

// glyphs is the set of runes both embedded fonts can draw.
var glyphs = sync.OnceValue(func() func(rune) bool {
	var fonts []*sfnt.Font
	for _, ttf := range [][]byte{liberationsansregular.TTF, liberationsansbold.TTF} {
		f, err := sfnt.Parse(ttf)
		if err != nil {
			panic("reports: embedded font: " + err.Error())
		}
		fonts = append(fonts, f)
	}
	var buf sfnt.Buffer
	var mu sync.Mutex
	cache := map[rune]bool{}
	return func(r rune) bool {
		mu.Lock()
		defer mu.Unlock()
		if ok, seen := cache[r]; seen {
			return ok
		}
		ok := true
		for _, f := range fonts {
			if gi, err := f.GlyphIndex(&buf, r); err != nil || gi == 0 {
				ok = false
			}
		}
		cache[r] = ok
		return ok
	}
})

// pdfText makes s safe and visible on a PDF page: invalid UTF-8 becomes
// U+FFFD; tabs, newlines and other control characters become spaces
// (multi-line text keeps its newlines when keepNewlines is set);
// bidirectional and other format characters (Unicode category Cf) are
// dropped, so they cannot reorder what is shown; and runes the embedded
// font cannot draw become "?".
func pdfText(s string, keepNewlines bool) string {
	s = strings.ToValidUTF8(s, "\uFFFD")
	has := glyphs()
	var b strings.Builder
	b.Grow(len(s))
	for _, r := range s {
		switch {
		case r == '\n' && keepNewlines:
			b.WriteRune('\n')
		case r == '\r' && keepNewlines:
			// dropped: "\r\n" keeps its newline
		case unicode.IsControl(r):
			b.WriteByte(' ')
		case unicode.Is(unicode.Cf, r):
			// dropped
		case r == ' ' || has(r):
			b.WriteRune(r)
		default:
			b.WriteByte('?')
		}
	}
	return b.String()
}
