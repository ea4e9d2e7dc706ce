package ingest

import (
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// ProgressMinBytes is the file size from which TerminalProgress draws a bar:
// smaller logs read in well under a second.
const ProgressMinBytes = 8 << 20

// TerminalProgress returns a hook for Options.Progress that draws a
// progress bar of the bytes read on stderr, and a done function that ends
// the bar. It returns a nil hook (and a done that does nothing) when stderr
// is not a terminal or the file is smaller than ProgressMinBytes, so scripts,
// CI logs and pipes stay clean. The bar is the only thing in the package
// that writes anywhere; cmd/ decides whether to ask for it.
func TerminalProgress(sizeBytes int64, description string) (progress func(readBytes, totalBytes int64), done func()) {
	if sizeBytes < ProgressMinBytes || !term.IsTerminal(int(os.Stderr.Fd())) {
		return nil, func() {}
	}
	bar := progressbar.NewOptions64(sizeBytes,
		progressbar.OptionSetWriter(os.Stderr),
		progressbar.OptionSetDescription(description),
		progressbar.OptionShowBytes(true),
		progressbar.OptionSetWidth(30),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
	)
	return func(read, _ int64) { _ = bar.Set64(read) }, func() { _ = bar.Finish() }
}
