package store_test

import (
	"os"
	"path/filepath"
	"testing"

	"whorl/store"
)

func TestFileDigest(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name, content, want string
	}{
		// FIPS 180-2, Appendix B.1 (one-block message "abc").
		{"abc", "abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"},
		// FIPS 180-2, Appendix B.2 (multi-block message).
		{"two blocks", "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq",
			"248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"},
		// SHA-256 of the empty message (FIPS 180-4 padding of a 0-bit message; common test vector).
		{"empty", "", "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			path := filepath.Join(t.TempDir(), "f")
			if err := os.WriteFile(path, []byte(tc.content), 0o444); err != nil {
				t.Fatal(err)
			}
			n, sum, err := store.FileDigest(path)
			if err != nil || n != int64(len(tc.content)) || sum != tc.want {
				t.Errorf("FileDigest(%q) = %d, %s, %v; want %d, %s", tc.content, n, sum, err, len(tc.content), tc.want)
			}
		})
	}
	if _, _, err := store.FileDigest(filepath.Join(t.TempDir(), "missing")); err == nil {
		t.Errorf("FileDigest of a missing file: no error")
	}
}
