package reports_test

import (
	"crypto/sha256"
	"encoding/hex"
	"os"
	"path/filepath"
	"testing"

	"whorl/reports"
)

func TestWriteFiles(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	in := handBuilt()
	files := reports.Files{PDF: filepath.Join(dir, "r.pdf"), IndicationsCSV: filepath.Join(dir, "i.csv"),
		RecordJSON: filepath.Join(dir, "r.json"), RecordCSV: filepath.Join(dir, "e.csv"), IndicationsJSON: filepath.Join(dir, "i.json")}
	written, err := reports.WriteFiles(in, files)
	if err != nil || len(written) != 5 {
		t.Fatalf("WriteFiles: %d files, %v; want 5", len(written), err)
	}
	for _, w := range written {
		b, err := os.ReadFile(w.Path)
		if err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(b)
		if int64(len(b)) != w.Bytes || hex.EncodeToString(sum[:]) != w.SHA256 {
			t.Errorf("%s: on disk %d bytes %x; reported %d %s", w.Path, len(b), sum, w.Bytes, w.SHA256)
		}
	}
	// A writer failure leaves neither the file nor a temporary one.
	in.Indications[0].VppV = nan()
	bad := filepath.Join(dir, "bad.json")
	if _, err := reports.WriteFiles(in, reports.Files{IndicationsJSON: bad}); err == nil {
		t.Fatalf("WriteFiles with a NaN amplitude: no error")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 5 {
		t.Errorf("after a failed write the directory holds %d entries; want the 5 earlier files only", len(ents))
	}
}
