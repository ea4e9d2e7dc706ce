package ingest

import (
	"bytes"
	"hash"
	"io"
	"runtime"
)

// The data rows are read by a pipeline: one goroutine reads the source in
// chunks of whole lines and hashes it, parser goroutines turn chunks into
// columns of numbers, and Stream's goroutine takes the parsed chunks in
// file order through the time checks, the window and the quality checks.
// Memory is bounded by the chunks in flight (a few MiB), whatever the log's
// length. A log whose decimal separator is not known yet (a ';' or tab log
// whose first rows hold only integers) is read sequentially instead, so the
// separator can be fixed by the first cell that shows one.

const (
	chunkBytes = 512 << 10 // bytes read per chunk (a chunk also holds the line carried over)
	maxWorkers = 4
)

// job is a chunk of whole lines.
type job struct {
	buf       []byte
	startLine int   // line number of buf's first line
	nLines    int   // lines in buf
	endOffset int64 // bytes read from the source up to the end of this chunk
	err       error // what ends the input after buf: a read error, a line too long
	eof       bool  // the last job
	res       chan *parsedChunk
}

// parsedChunk holds the rows of a job as columns.
type parsedChunk struct {
	job           *job
	rows          int
	t             []float64   // time (s), with a time column
	timePlaces    placeCounts // the time cells by their decimal places
	vals          [][]float64 // per channel, SI
	firstNonBlank int         // line of the chunk's first non-blank line, 0 if none
	blank         int         // first line of a run of blank lines at the end of the chunk, 0 if none
	err           error       // the first bad line's error, after rows good rows
}

func (c *parsedChunk) reset(j *job, nch, rows int) {
	c.job = j
	c.rows, c.firstNonBlank, c.blank, c.err = 0, 0, 0, nil
	if cap(c.t) < rows {
		c.t = make([]float64, rows+rows/4)
	}
	c.t = c.t[:cap(c.t)]
	if len(c.vals) != nch {
		c.vals = make([][]float64, nch)
	}
	for k := range c.vals {
		if cap(c.vals[k]) < rows {
			c.vals[k] = make([]float64, rows+rows/4)
		}
		c.vals[k] = c.vals[k][:cap(c.vals[k])]
	}
}

// chunker cuts the source into jobs.
type chunker struct {
	src    io.Reader
	h      hash.Hash
	nread  int64
	line   int // number of the next line
	carry  []byte
	eof    bool
	maxLen int
}

// nextJob fills buf (cap >= chunkBytes+MaxLineBytes+2) with the carried-over
// partial line and the next chunk, and cuts it after its last '\n'.
func (c *chunker) nextJob(buf []byte, r *Reader) *job {
	for {
		if c.eof {
			if cap(buf) < len(c.carry) {
				buf = make([]byte, 0, len(c.carry))
			}
		} else if cap(buf) < len(c.carry)+chunkBytes {
			buf = make([]byte, 0, len(c.carry)+chunkBytes+MaxLineBytes+2)
		}
		buf = append(buf[:0], c.carry...)
		c.carry = c.carry[:0]
		var err error
		n := 0
		if !c.eof {
			n, err = io.ReadFull(c.src, buf[len(buf):len(buf)+chunkBytes])
			if n > 0 {
				c.h.Write(buf[len(buf) : len(buf)+n])
				c.nread += int64(n)
			}
			if err == io.ErrUnexpectedEOF || (n == 0 && err == nil) {
				err = io.EOF
			}
		}
		buf = buf[:len(buf)+n]
		j := &job{startLine: c.line}
		if err != nil || c.eof {
			c.eof = true
			j.eof = true
			if err != io.EOF {
				j.err = err
			}
			j.buf = buf
			j.nLines = bytes.Count(buf, nl)
			if len(buf) > 0 && buf[len(buf)-1] != '\n' {
				j.nLines++
			}
			if len(buf) > 0 && buf[len(buf)-1] != '\n' && lastLineLen(buf) > MaxLineBytes+1 {
				j.err = nil
				j.buf, j.nLines = buf[:len(buf)-lastLineLen(buf)], j.nLines-1
				j.err = r.errLine(c.line+j.nLines, ErrLineTooLong, "longer than %d bytes; is this a CSV log with line ends?", MaxLineBytes)
			}
			j.endOffset = c.nread
			c.line += j.nLines
			return j
		}
		cut := bytes.LastIndexByte(buf, '\n') + 1
		if cut == 0 {
			// no line end in the whole chunk
			if len(buf) > MaxLineBytes+1 {
				c.eof = true
				return &job{startLine: c.line, eof: true, endOffset: c.nread,
					err: r.errLine(c.line, ErrLineTooLong, "longer than %d bytes; is this a CSV log with line ends?", MaxLineBytes)}
			}
			c.carry = append(c.carry, buf...)
			continue
		}
		c.carry = append(c.carry, buf[cut:]...)
		j.buf = buf[:cut]
		j.nLines = bytes.Count(j.buf, nl)
		j.endOffset = c.nread
		c.line += j.nLines
		return j
	}
}

var nl = []byte{'\n'}

func lastLineLen(b []byte) int { return len(b) - (bytes.LastIndexByte(b, '\n') + 1) }

// parseJob parses the lines of a job into c.
func (p *rowParser) parseJob(j *job, c *parsedChunk, nch int, timeScale float64, vals []float64) {
	c.reset(j, nch, j.nLines)
	p.timePlaces = placeCounts{}
	defer func() { c.timePlaces = p.timePlaces }()
	buf := j.buf
	// NUL bytes: one pass over the rest of the chunk when the general path
	// first needs to know (a line that fastRow takes holds none), then the
	// lines are looked at only if there is one
	hasNUL, nulKnown := false, false
	line := j.startLine - 1
	pos := 0
	fast, misses := p.fast, 0
	for pos < len(buf) {
		if fast && p.sepLocked && c.blank == 0 {
			// a plain line in one pass over its bytes
			if next := p.fastRow(buf, pos, c.rows, c, timeScale); next != pos {
				line++
				if c.firstNonBlank == 0 {
					c.firstNonBlank = line
				}
				c.rows++
				pos = next
				continue
			}
			// A line for the general path. When such lines are common
			// (a log written with blanks around its cells, say) the fast
			// path is not tried again in this chunk: it would read most
			// of each line twice. Measured with BenchmarkParseChunkUnusual
			// (a blank before every line end) on the 2-core test machine:
			// 19.0 ns a cell, against 32.2 ns when every line was tried.
			misses++
			fast = misses <= c.rows/16+16
		}
		start := pos
		var l []byte
		if e := bytes.IndexByte(buf[pos:], '\n'); e >= 0 {
			l = buf[pos : pos+e]
			pos += e + 1
		} else {
			l = buf[pos:]
			pos = len(buf)
		}
		line++
		if n := len(l); n > 0 && l[n-1] == '\r' {
			l = l[:n-1]
		}
		if len(l) > MaxLineBytes {
			c.err = p.r.errLine(line, ErrLineTooLong, "longer than %d bytes", MaxLineBytes)
			return
		}
		if len(l) == 0 || ((l[0] == ' ' || l[0] == '\t') && len(bytes.TrimSpace(l)) == 0) {
			if c.blank == 0 {
				c.blank = line
			}
			continue
		}
		if c.firstNonBlank == 0 {
			c.firstNonBlank = line
		}
		if c.blank != 0 {
			c.err = blankLineErr(p.r, c.blank, line)
			return
		}
		if !nulKnown {
			hasNUL, nulKnown = bytes.IndexByte(buf[start:], 0) >= 0, true
		}
		if hasNUL && bytes.IndexByte(l, 0) >= 0 {
			c.err = p.r.binaryErr(line, l, "data row")
			return
		}
		p.line = line
		t, err := p.parseRow(l, vals)
		if err != nil {
			c.err = err
			return
		}
		k := c.rows
		c.t[k] = t * timeScale
		for ch, v := range vals {
			c.vals[ch][k] = v
		}
		c.rows++
	}
	if c.err == nil {
		c.err = j.err
	}
}

func blankLineErr(r *Reader, blank, next int) error {
	return r.errLine(blank, ErrBlankLine, "an empty line, and more rows after it at line %d; remove it (or cut the log there)", next)
}

// pipeline runs the chunker and the parsers.
type pipeline struct {
	r         *Reader
	ch        *chunker
	seq       *rowParser // sequential mode when not nil
	seqBuf    []byte
	seqChunk  *parsedChunk
	nch       int
	timeScale float64
	vals      []float64

	order   chan *job
	jobs    chan *job
	free    chan []byte
	resFree chan *parsedChunk
	done    chan struct{} // closed by stop; never reassigned
	stopped bool
	ended   bool
}

func newPipeline(r *Reader) *pipeline {
	ls := r.src
	ch := &chunker{src: ls.src, h: ls.h, nread: ls.nread, line: r.line + 1, eof: ls.eof,
		carry: append([]byte(nil), ls.buf[ls.pos:]...)}
	if ls.err != nil {
		ch.eof = true
	}
	p := &pipeline{r: r, ch: ch, nch: len(r.info.Channels), timeScale: r.timeScale}
	p.timeScale = r.timeScale
	if !r.info.HasTime {
		p.timeScale = 0
	}
	bufCap := chunkBytes + MaxLineBytes + 2 + len(ch.carry)
	workers := min(runtime.GOMAXPROCS(0), maxWorkers)
	if !r.sepLocked || workers < 2 || ch.eof {
		// sequential: the separator may still be locked, one core only, or
		// the whole log is already in memory
		p.seq = r.newRowParser()
		p.seqChunk = &parsedChunk{}
		p.vals = make([]float64, p.nch)
		return p
	}
	nbuf := workers + 2
	p.order = make(chan *job, 2*nbuf+2)
	p.jobs = make(chan *job, 2*nbuf+2)
	p.free = make(chan []byte, nbuf)
	p.resFree = make(chan *parsedChunk, nbuf)
	p.done = make(chan struct{})
	for range nbuf {
		p.free <- make([]byte, 0, bufCap)
		p.resFree <- &parsedChunk{}
	}
	go p.readLoop()
	for range workers {
		go p.work(r.newRowParser())
	}
	return p
}

func (p *pipeline) readLoop() {
	for {
		var buf []byte
		select {
		case buf = <-p.free:
		case <-p.done:
			return
		}
		j := p.ch.nextJob(buf, p.r)
		j.res = make(chan *parsedChunk, 1)
		select {
		case p.order <- j:
		case <-p.done:
			return
		}
		select {
		case p.jobs <- j:
		case <-p.done:
			return
		}
		if j.eof {
			return
		}
	}
}

func (p *pipeline) work(rp *rowParser) {
	vals := make([]float64, p.nch)
	for {
		// a result chunk first, then a job: every job taken can finish
		var c *parsedChunk
		select {
		case c = <-p.resFree:
		case <-p.done:
			return
		}
		var j *job
		select {
		case j = <-p.jobs:
		case <-p.done:
			return
		}
		rp.parseJob(j, c, p.nch, p.timeScale, vals)
		p.free <- j.buf[:0]
		j.buf = nil
		j.res <- c
	}
}

// next returns the next parsed chunk in file order, nil after the last.
// The chunk is valid until release.
func (p *pipeline) next() *parsedChunk {
	if p.ended {
		return nil
	}
	if p.seq != nil {
		j := p.ch.nextJob(p.seqBuf, p.r)
		p.seqBuf = j.buf
		p.seq.parseJob(j, p.seqChunk, p.nch, p.timeScale, p.vals)
		if p.seq.sepLocked {
			p.r.info.DecimalComma = p.seq.sep == ','
		}
		p.ended = j.eof
		return p.seqChunk
	}
	var j *job
	select {
	case j = <-p.order:
	case <-p.done:
		return nil
	}
	c := <-j.res
	p.ended = j.eof
	return c
}

func (p *pipeline) release(c *parsedChunk) {
	if p.seq == nil && c != nil {
		p.resFree <- c
	}
}

// stop ends the goroutines (the reader may stay blocked in a Read of the
// source until it returns).
func (p *pipeline) stop() {
	if p.done != nil && !p.stopped {
		close(p.done)
		p.stopped = true
	}
}
