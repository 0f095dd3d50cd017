package acquire

import (
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

// TestReadScanFileMemory checks that importing a file allocates about the
// decoded samples and the read buffer, not a copy of the text or repeated
// growth of the sample slices. It counts allocated bytes, not time.
func TestReadScanFileMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("writes an 8 MB file")
	}
	if raceEnabled {
		t.Skip("the race detector changes allocation counts")
	}
	text := benchScanText(8<<20, -1)
	path := filepath.Join(t.TempDir(), "mem.csv")
	if err := os.WriteFile(path, text, 0o644); err != nil {
		t.Fatal(err)
	}
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	s, err := ReadScanFile(path)
	runtime.ReadMemStats(&after)
	if err != nil {
		t.Fatal(err)
	}
	decoded := uint64(s.Len()) * (8 + 8 + 16*uint64(len(s.Channels)))
	got := after.TotalAlloc - before.TotalAlloc
	// Allowance: 5 % over the decoded samples for the size estimate, the
	// 1 MiB read buffer and 256 KiB for the first rows and small objects.
	limit := decoded + decoded/20 + readBufferSize + 256<<10
	if got > limit {
		t.Errorf("importing %d bytes of text (%d samples): allocated %d bytes, want at most %d (decoded samples %d)", len(text), s.Len(), got, limit, decoded)
	}
	t.Logf("text %d bytes, decoded %d bytes, allocated %d bytes", len(text), decoded, got)
}
