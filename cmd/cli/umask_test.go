//go:build unix

package cli

import (
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// Item 8: results, logs and tables are created 0644 under the umask, like
// any file a program writes (os.CreateTemp alone would make them 0600).
func TestOutputsFollowTheUmask(t *testing.T) {
	dir := t.TempDir()
	for _, mask := range []int{0o022, 0o027} {
		old := syscall.Umask(mask)
		json := filepath.Join(dir, "model.json")
		code, _, errs := run(t, "model", "--setup", exampleSetup, "--json", json)
		logPath := filepath.Join(dir, "drop.csv")
		code2, _, errs2 := run(t, "simulate", "--setup", exampleSetup, "--test", "drop", "--out", logPath)
		syscall.Umask(old)
		if code != exitOK || code2 != exitOK {
			t.Fatalf("exit %d, %d: %s %s", code, code2, errs, errs2)
		}
		for _, p := range []string{json, logPath} {
			st, err := os.Stat(p)
			if err != nil {
				t.Fatal(err)
			}
			if want := os.FileMode(0o644 &^ mask); st.Mode().Perm() != want {
				t.Errorf("umask %03o: %s is %v, want %v", mask, filepath.Base(p), st.Mode().Perm(), want)
			}
		}
	}
}
