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
	f := terminal(w)
	if sizeBytes < progressMinBytes || f == nil {
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

// countProgress returns a function that draws a bar of count logs done
// out of total on w, and a done function that ends the bar; both do
// nothing unless w is a terminal.
func countProgress(w io.Writer, total int, description string) (step func(done int), done func()) {
	f := terminal(w)
	if f == nil {
		return func(int) {}, func() {}
	}
	bar := progressbar.NewOptions(total,
		progressbar.OptionSetWriter(f),
		progressbar.OptionSetDescription(description),
		progressbar.OptionShowCount(),
		progressbar.OptionSetWidth(30),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
	)
	return func(n int) { _ = bar.Set(n) }, func() { _ = bar.Finish() }
}

// terminal returns w as a file when it is a terminal, else nil.
func terminal(w io.Writer) *os.File {
	if f, ok := w.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		return f
	}
	return nil
}
