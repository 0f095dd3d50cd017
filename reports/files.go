package reports

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Files names the output files of WriteFiles; an empty name is skipped.
type Files struct {
	PDF             string // WritePDF
	IndicationsCSV  string // WriteIndicationsCSV
	RecordJSON      string // WriteRecordJSON
	RecordCSV       string // WriteRecordCSV
	IndicationsJSON string // WriteIndicationsJSON
}

// Written describes one file written by WriteFiles.
type Written struct {
	Kind   string `json:"kind"` // pdf, indications-csv, record-json, record-csv, indications-json
	Path   string `json:"path"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// WriteFiles writes the named outputs of in, each through a temporary file
// in the same directory renamed into place only when complete, so that a
// failure leaves no partial file. It stops at the first error; files
// written before it stay.
func WriteFiles(in *Inspection, f Files) ([]Written, error) {
	return writeFiles(f, [5]func(io.Writer) error{
		func(w io.Writer) error { return WritePDF(w, in) },
		func(w io.Writer) error { return WriteIndicationsCSV(w, in) },
		func(w io.Writer) error { return WriteRecordJSON(w, in) },
		func(w io.Writer) error { return WriteRecordCSV(w, in) },
		func(w io.Writer) error { return WriteIndicationsJSON(w, in) },
	})
}

// writeFiles writes the outputs named in f with write, in the order PDF,
// indications CSV, record JSON, record CSV, indications JSON.
func writeFiles(f Files, write [5]func(io.Writer) error) ([]Written, error) {
	outs := []struct {
		kind, path string
		write      func(io.Writer) error
	}{
		{"pdf", f.PDF, write[0]},
		{"indications-csv", f.IndicationsCSV, write[1]},
		{"record-json", f.RecordJSON, write[2]},
		{"record-csv", f.RecordCSV, write[3]},
		{"indications-json", f.IndicationsJSON, write[4]},
	}
	var done []Written
	for _, o := range outs {
		if o.path == "" {
			continue
		}
		w, err := writeAtomic(o.path, o.write)
		if err != nil {
			return done, fmt.Errorf("write %s: %w", o.path, err)
		}
		w.Kind = o.kind
		done = append(done, w)
	}
	return done, nil
}

type countingWriter struct {
	w io.Writer
	n int64
}

func (c *countingWriter) Write(p []byte) (int, error) {
	n, err := c.w.Write(p)
	c.n += int64(n)
	return n, err
}

func writeAtomic(path string, write func(io.Writer) error) (w Written, err error) {
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return w, err
	}
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(f.Name())
		}
	}()
	h := sha256.New()
	cw := &countingWriter{w: io.MultiWriter(f, h)}
	if err := write(cw); err != nil {
		return w, err
	}
	if err := f.Sync(); err != nil {
		return w, err
	}
	if err := f.Close(); err != nil {
		return w, err
	}
	if err := os.Chmod(f.Name(), 0o644); err != nil {
		return w, err
	}
	if err := os.Rename(f.Name(), path); err != nil {
		return w, err
	}
	return Written{Path: path, Bytes: cw.n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}
