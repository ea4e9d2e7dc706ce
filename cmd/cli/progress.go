package cli

import (
	"io"
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progressMinBytes is the file size from which terminalProgress draws a bar:
// smaller logs read in well under a second.
const progressMinBytes = 8 << 20

// terminalProgress returns a hook for ingest.Options.Progress that draws a
// bar of the bytes read on w, and a done function that ends the bar. It
// returns a nil hook (and a done that does nothing) unless w is a terminal
// (an *os.File that term.IsTerminal) and the file holds at least
// progressMinBytes, so scripts, CI logs, pipes and tests stay clean.
func terminalProgress(w io.Writer, sizeBytes int64, description string) (progress func(readBytes, totalBytes int64), done func()) {
	f, ok := w.(*os.File)
	if sizeBytes < progressMinBytes || !ok || !term.IsTerminal(int(f.Fd())) {
		return nil, func() {}
	}
	bar := progressbar.NewOptions64(sizeBytes,
		progressbar.OptionSetWriter(f),
		progressbar.OptionSetDescription(description),
		progressbar.OptionShowBytes(true),
		progressbar.OptionSetWidth(30),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
	)
	return func(read, _ int64) { _ = bar.Set64(read) }, func() { _ = bar.Finish() }
}
