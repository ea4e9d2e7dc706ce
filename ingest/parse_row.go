package ingest

import (
	"bytes"
)

// rowParser converts data rows. Each parsing goroutine has its own; they
// share the Reader read-only (its Info for messages), except in the
// sequential mode that can still lock the decimal separator.
type rowParser struct {
	r         *Reader
	line      int // line number of the row being parsed, for messages
	delim     byte
	sep       byte // decimal separator in use
	sepLocked bool
	ncols     int
	trailing  bool
	fast      bool // no skipped column: plain rows can take fastRow
	slot      []int32
	scales    []float64
	cells     [][]byte
	// timePlaces counts the time cells parsed since the caller last reset
	// it by their decimal places.
	timePlaces placeCounts
}

func (r *Reader) newRowParser() *rowParser {
	p := &rowParser{r: r, delim: r.delim, sep: r.sep, sepLocked: r.sepLocked, ncols: r.ncols,
		trailing: r.trailing, slot: r.slot, scales: r.scales, fast: true}
	for _, s := range r.slot {
		if s == slotSkip {
			p.fast = false
		}
	}
	return p
}

// fastRow parses a plain data line, the line starting at buf[pos], straight
// into row k of c: every cell a number (scanFloat) with nothing around it,
// between single delimiters, the line ending in '\n', "\r\n" or the end of
// buf (after one empty trailing cell if the header has one), the separator
// locked, no column skipped. It returns where the next line starts, or pos
// when the line is anything else, for the general path (parseRow, behind
// the checks of parseJob) to parse it or report what is wrong; rows of c
// from k on hold nothing that counts then. What it stores is what parseRow
// and parseJob would: the value times its scale, the time cell times
// timeScale, the time cell's decimal places counted once the line is good.
// FuzzParseJob checks the two paths agree.
//
// Why: the general path finds each line's end first (bytes.IndexByte), then
// walks the line again in parseRow, cell by cell with the checks for blanks
// and quotes, and copies the row from vals into the columns. Measured on the
// 2-core test machine (an AMD EPYC virtual machine, Go 1.26; medians of 20
// interleaved runs): BenchmarkParseChunk 15.5 ns a cell, against 18.2 ns
// without this path (BenchmarkParseChunkGeneral) and 18.4 ns before it was
// written. In CPU profiles of an analyze run of an hour-long 512 Hz
// five-column log (three runs each), the row handling outside scanFloat
// fell from 11-12 % of the CPU time (parseRow, parseJob, bytes.IndexByte)
// to 6-7 % (fastRow, parseJob).
func (p *rowParser) fastRow(buf []byte, pos, k int, c *parsedChunk, timeScale float64) int {
	start := pos
	n := len(buf)
	delim, sep := p.delim, p.sep
	var t float64
	places := 0
	slot := p.slot
	col := 0
	if slot[0] == slotTime {
		f, e, st, pl := scanFloat(buf, pos, sep, delim)
		if st != numOK {
			return start
		}
		t, places = f, pl
		pos = e
		col = 1
	}
	for ; col < len(slot); col++ {
		if col > 0 {
			if pos >= n || buf[pos] != delim {
				return start
			}
			pos++
		}
		s := slot[col]
		f, e, st, _ := scanFloat(buf, pos, sep, delim)
		if st != numOK {
			return start
		}
		c.vals[s][k] = f * p.scales[s]
		pos = e
	}
	end := pos
	if p.trailing && end < n && buf[end] == delim {
		end++
	}
	next := end
	switch {
	case end == n:
	case buf[end] == '\n':
		next = end + 1
	case buf[end] == '\r' && end+1 < n && buf[end+1] == '\n':
		next = end + 2
	default:
		return start
	}
	if end-start > MaxLineBytes {
		return start
	}
	c.t[k] = t * timeScale
	if slot[0] == slotTime {
		p.timePlaces.add(places)
	}
	return next
}

// parseRow converts the requested cells of a data line into vals (SI) and
// returns the time cell (in the column's unit) when there is a time column.
// The common case, cells without quotes, is a single pass over the line.
func (p *rowParser) parseRow(b []byte, vals []float64) (float64, error) {
	if !p.sepLocked {
		// a ';' or tab log whose rows so far held only integers: the slow
		// path locks the decimal separator on the first cell that shows one
		return p.parseQuotedRow(b, vals)
	}
	delim, sep := p.delim, p.sep
	var t float64
	pos := 0
	n := len(b)
	for c := 0; c < p.ncols; c++ {
		if c > 0 {
			if pos >= n || b[pos] != delim {
				return 0, p.raggedErr(b)
			}
			pos++
		}
		s := p.slot[c]
		if s == slotSkip {
			j := bytes.IndexByte(b[pos:], delim)
			end := n
			if j >= 0 {
				end = pos + j
			}
			if bytes.IndexByte(b[pos:end], '"') >= 0 {
				return p.parseQuotedRow(b, vals)
			}
			pos = end
			continue
		}
		// the cell: optional blanks, a number, optional blanks
		for pos < n && (b[pos] == ' ' || (b[pos] == '\t' && delim != '\t')) {
			pos++
		}
		if pos < n && b[pos] == '"' {
			return p.parseQuotedRow(b, vals)
		}
		f, end, st, places := scanFloat(b, pos, sep, delim)
		for end < n && (b[end] == ' ' || (b[end] == '\t' && delim != '\t')) {
			end++
		}
		if st != numOK || (end < n && b[end] != delim) || end == pos {
			return 0, p.cellErr(b, c, pos, st)
		}
		if s == slotTime {
			t = f
			p.timePlaces.add(places)
		} else {
			vals[s] = f * p.scales[s]
		}
		pos = end
	}
	if pos < n {
		// more cells than the header: allowed only for one empty trailing cell
		if p.trailing && pos+1 == n && b[pos] == delim {
			return t, nil
		}
		if p.trailing && pos+1 < n && b[pos] == delim && len(trimBlank(b[pos+1:], delim)) == 0 {
			return t, nil
		}
		return 0, p.raggedErr(b)
	}
	return t, nil
}

// parseQuotedRow is the slow path for rows with quoted cells.
func (p *rowParser) parseQuotedRow(b []byte, vals []float64) (float64, error) {
	cells, ok := splitQuoted(b, p.delim, p.cells)
	p.cells = cells[:0]
	if !ok {
		return 0, p.r.errLine(p.line, ErrRagged, "a double quote is not closed")
	}
	if p.trailing && len(cells) == p.ncols+1 && len(cells[p.ncols]) == 0 {
		cells = cells[:p.ncols]
	}
	if len(cells) != p.ncols {
		return 0, p.raggedErr(b)
	}
	var t float64
	for c, cell := range cells {
		s := p.slot[c]
		if s == slotSkip {
			continue
		}
		f, places, st := p.parseCell(cell)
		if st != numOK || len(cell) == 0 {
			return 0, p.cellErrText(c, cell, st)
		}
		if s == slotTime {
			t = f
			p.timePlaces.add(places)
		} else {
			vals[s] = f * p.scales[s]
		}
	}
	return t, nil
}

// parseCell parses a whole cell, locking the decimal separator of a ';' or
// tab log on the first cell that shows one. It returns the value, its
// decimal places (see scanFloat) and the outcome.
func (p *rowParser) parseCell(cell []byte) (float64, int, int) {
	f, end, st, places := scanFloat(cell, 0, p.sep, 0)
	if st == numOtherSep && !p.sepLocked {
		p.sep = otherSep(p.sep)
		p.sepLocked = true
		p.r.info.DecimalComma = p.sep == ','
		f, end, st, places = scanFloat(cell, 0, p.sep, 0)
	}
	if st == numOK && end != len(cell) {
		st = numBad
	}
	if st == numOK && !p.sepLocked && bytes.IndexByte(cell, p.sep) >= 0 {
		p.sepLocked = true
	}
	return f, places, st
}

func otherSep(s byte) byte {
	if s == '.' {
		return ','
	}
	return '.'
}

func (p *rowParser) raggedErr(b []byte) error {
	cells, ok := splitQuoted(b, p.delim, nil)
	if !ok {
		return p.r.errLine(p.line, ErrRagged, "a double quote is not closed")
	}
	n := len(cells)
	if p.trailing && n == p.ncols+1 && len(cells[n-1]) == 0 {
		n--
	}
	if n < p.ncols {
		return p.r.errAt(p.line, n, ErrRagged, "%d cells where the header has %d; the row ends before this column", n, p.ncols)
	}
	return p.r.errLine(p.line, ErrRagged, "%d cells where the header has %d (delimiter %s)", n, p.ncols, delimName(p.delim))
}

func delimName(d byte) string {
	switch d {
	case '\t':
		return "tab"
	case ';':
		return "';'"
	}
	return "','"
}

// cellErr explains why cell c, starting at pos in line b, failed.
func (p *rowParser) cellErr(b []byte, c, pos, st int) error {
	j := bytes.IndexByte(b[pos:], p.delim)
	end := len(b)
	if j >= 0 {
		end = pos + j
	}
	cell := trimBlank(b[pos:end], p.delim)
	if len(cell) > 0 && cell[0] == '"' {
		if q, ok := splitQuoted(cell, p.delim, nil); ok && len(q) == 1 {
			cell = q[0]
		}
	}
	_, st = parseFloat(cell, p.sep)
	if st == numOtherSep || st == numNotFinite {
		return p.cellErrText(c, cell, st)
	}
	return p.cellErrText(c, cell, numBad)
}

func (p *rowParser) cellErrText(c int, cell []byte, st int) error {
	shown := string(cell)
	if len(shown) > 40 {
		shown = shown[:40] + "..."
	}
	switch {
	case len(cell) == 0:
		return p.r.errAt(p.line, c, ErrNotNumber, "empty cell")
	case st == numNotFinite:
		return p.r.errAt(p.line, c, ErrNotFinite, "%q; every sample must be a finite number", shown)
	case st == numOtherSep:
		if p.sep == ',' {
			return p.r.errAt(p.line, c, ErrDecimal, "%q has a decimal point, but the log uses decimal commas", shown)
		}
		return p.r.errAt(p.line, c, ErrDecimal, "%q has a decimal comma, but the log uses decimal points", shown)
	}
	hint := ""
	if cell[0] == '#' {
		hint = " (note lines starting with # belong before the header)"
	} else if p.sep == ',' && bytes.Count(cell, []byte{','})+bytes.Count(cell, []byte{'.'}) > 1 {
		hint = " (thousands separators are not accepted)"
	} else if p.sep == '.' && bytes.Count(cell, []byte{'.'}) > 1 {
		hint = " (thousands separators are not accepted)"
	}
	return p.r.errAt(p.line, c, ErrNotNumber, "%q%s", shown, hint)
}
