package outfile

import (
	"bytes"
	"crypto/rand"
	"encoding/hex"
	"os"
	"path/filepath"
)

// commitBuffer writes buf to a hidden file beside path and renames it over
// path. The caller holds commitLock.
func commitBuffer(buf *bytes.Buffer, path string) error {
	tmp := hiddenName(path)
	if err := os.WriteFile(tmp, buf.Bytes(), 0o644); err != nil {
		os.Remove(tmp)
		return err
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return err
	}
	return nil
}

// hiddenName is a fresh hidden name beside path, marked as ours.
func hiddenName(path string) string {
	var b [6]byte
	rand.Read(b[:])
	return filepath.Join(filepath.Dir(path), "."+filepath.Base(path)+tmpMark+hex.EncodeToString(b[:]))
}
