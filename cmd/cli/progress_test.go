package cli

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"testing"
)

// A bar is drawn only on a terminal: a buffer (what tests and ErrOrStderr
// redirections give) and a plain file stay silent, whatever the size.
func TestTerminalProgressSilent(t *testing.T) {
	f, err := os.Create(filepath.Join(t.TempDir(), "stderr.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	for _, size := range []int64{1 << 10, 1 << 30} {
		for name, w := range map[string]io.Writer{"buffer": &bytes.Buffer{}, "file": f} {
			fn, done := terminalProgress(w, size, "reading x")
			if fn != nil {
				t.Errorf("size %d on a %s: a bar on a non-terminal", size, name)
			}
			done()
			step, done := countProgress(w, 10, "analysing")
			step(3)
			done()
		}
	}
	if st, _ := f.Stat(); st.Size() != 0 {
		t.Errorf("%d bytes written to a non-terminal", st.Size())
	}
}
