package ingest

import (
	"bytes"
	"fmt"
	"strings"
	"unicode/utf8"
)

// standardGravity is g_n, the standard acceleration of gravity (m/s^2),
// exact by definition (3rd CGPM, 1901).
const standardGravity = 9.80665

// accelUnits maps the acceleration units of the log dialect to their SI
// scale. "G" is accepted beside "g" because many DAQ systems write it so; no
// other SI unit is spelled G in an accelerometer log.
var accelUnits = map[string]float64{
	"m/s^2": 1, "m/s2": 1, "m/s²": 1, "m s^-2": 1, "m s-2": 1, "m s⁻²": 1, "m·s^-2": 1, "m·s⁻²": 1,
	"mm/s^2": 1e-3, "mm/s2": 1e-3, "mm/s²": 1e-3, "mm s^-2": 1e-3,
	"g": standardGravity, "G": standardGravity,
}

// timeUnits maps time units to seconds.
var timeUnits = map[string]float64{"s": 1, "ms": 1e-3}

// isTimeName reports whether a header name is a time column's (time or t,
// any case).
func isTimeName(name string) bool {
	return strings.EqualFold(name, "time") || strings.EqualFold(name, "t")
}

// detectDelimiter picks the delimiter of a header line: the most frequent
// of ',', ';' and tab outside double quotes; on a tie tab wins over ';' and
// ';' over ',' (a ';' or tab log may have commas in a quoted name, a ','
// log hardly ever the other two). A header without any is one column,
// read as ','.
func detectDelimiter(line []byte) byte {
	var nComma, nSemi, nTab int
	inQ := false
	for _, c := range line {
		switch c {
		case '"':
			inQ = !inQ
		case ',':
			if !inQ {
				nComma++
			}
		case ';':
			if !inQ {
				nSemi++
			}
		case '\t':
			if !inQ {
				nTab++
			}
		}
	}
	switch {
	case nTab > 0 && nTab >= nSemi && nTab >= nComma:
		return '\t'
	case nSemi > 0 && nSemi >= nComma:
		return ';'
	}
	return ','
}

// splitQuoted splits a line into cells at delim, honouring double quotes
// (RFC 4180: a quoted cell may hold the delimiter, "" is a quote). Spaces
// around a cell are trimmed, and so is a pair of surrounding quotes. ok is
// false when a quote is left open.
func splitQuoted(line []byte, delim byte, dst [][]byte) (cells [][]byte, ok bool) {
	cells = dst[:0]
	i := 0
	for {
		// skip leading blanks
		for i < len(line) && isBlank(line[i], delim) {
			i++
		}
		if i < len(line) && line[i] == '"' {
			i++
			var cell []byte
			closed := false
			start := i
			for i < len(line) {
				if line[i] == '"' {
					if i+1 < len(line) && line[i+1] == '"' {
						cell = append(cell, line[start:i+1]...)
						i += 2
						start = i
						continue
					}
					closed = true
					break
				}
				i++
			}
			if !closed {
				return cells, false
			}
			if cell == nil {
				cell = line[start:i]
			} else {
				cell = append(cell, line[start:i]...)
			}
			i++ // closing quote
			// anything up to the delimiter must be blank
			for i < len(line) && line[i] != delim {
				if !isBlank(line[i], delim) {
					// junk after a closing quote: keep it, so the cell fails
					// to parse and the message shows it
					j := bytes.IndexByte(line[i:], delim)
					if j < 0 {
						j = len(line) - i
					}
					cell = append(append([]byte{}, cell...), line[i:i+j]...)
					i += j
					break
				}
				i++
			}
			cells = append(cells, cell)
		} else {
			j := bytes.IndexByte(line[i:], delim)
			end := len(line)
			if j >= 0 {
				end = i + j
			}
			cells = append(cells, trimBlank(line[i:end], delim))
			i = end
		}
		if i >= len(line) {
			return cells, true
		}
		i++ // delimiter
		if i == len(line) {
			return append(cells, line[i:]), true // an empty last cell
		}
	}
}

func isBlank(c, delim byte) bool {
	return c == ' ' || (c == '\t' && delim != '\t')
}

func trimBlank(b []byte, delim byte) []byte {
	for len(b) > 0 && isBlank(b[0], delim) {
		b = b[1:]
	}
	for len(b) > 0 && isBlank(b[len(b)-1], delim) {
		b = b[:len(b)-1]
	}
	return b
}

// splitNameUnit splits a header cell "name [unit]" into its parts. A cell
// "name (unit)" whose parentheses hold a unit of the dialect is read the
// same way; other parentheses belong to the name. A cell without either has
// no unit.
func splitNameUnit(cell string) (name, unit string, hasUnit bool, err string) {
	open := strings.LastIndexByte(cell, '[')
	if open < 0 {
		if strings.ContainsRune(cell, ']') {
			return cell, "", false, "a ']' without '['; write the unit as \"name [unit]\""
		}
		cell = strings.TrimSpace(cell)
		if i := strings.LastIndexByte(cell, '('); i > 0 && strings.HasSuffix(cell, ")") {
			u := strings.TrimSpace(cell[i+1 : len(cell)-1])
			if _, ok := accelUnits[u]; ok || timeUnits[u] > 0 {
				return strings.TrimSpace(cell[:i]), u, true, ""
			}
		}
		return cell, "", false, ""
	}
	rest := strings.TrimSpace(cell[open+1:])
	if !strings.HasSuffix(rest, "]") {
		return cell, "", false, "the unit's '[' is not closed by a ']' at the end of the cell"
	}
	name = strings.TrimSpace(cell[:open])
	unit = strings.TrimSpace(rest[:len(rest)-1])
	return name, unit, true, ""
}

// header is the parsed header row.
type header struct {
	cols     []Column
	hasUnit  []bool
	trailing bool // the header ends with a delimiter: rows may too
}

// parseHeader splits and checks a header line (already known to hold no NUL
// and to be valid UTF-8). It does not check the requested channels.
func parseHeader(path string, lineNo int, line []byte, delim byte) (*header, error) {
	cells, ok := splitQuoted(line, delim, nil)
	if !ok {
		return nil, &ParseError{Path: path, Line: lineNo, ColumnIndex: -1, Kind: ErrHeader,
			Detail: "a double quote is not closed"}
	}
	h := &header{}
	if len(cells) > 1 && len(cells[len(cells)-1]) == 0 {
		// "a,b," : a trailing delimiter, as some DAQ systems write
		cells = cells[:len(cells)-1]
		h.trailing = true
	}
	for i, c := range cells {
		name, unit, hasUnit, bad := splitNameUnit(string(c))
		if bad != "" {
			return nil, &ParseError{Path: path, Line: lineNo, Column: string(c), ColumnIndex: i,
				Kind: ErrHeader, Detail: bad}
		}
		if name == "" {
			return nil, &ParseError{Path: path, Line: lineNo, Column: fmt.Sprintf("#%d", i+1), ColumnIndex: i,
				Kind: ErrHeader, Detail: fmt.Sprintf("column %d has no name; every column needs one", i+1)}
		}
		col := Column{Index: i, Name: name, Unit: unit}
		if isTimeName(name) {
			if i != 0 {
				return nil, &ParseError{Path: path, Line: lineNo, Column: name, ColumnIndex: i, Kind: ErrHeader,
					Detail: fmt.Sprintf("a time column must be the first column; this is column %d", i+1)}
			}
			col.Time = true
			col.Scale = timeUnits[unit]
			if !hasUnit {
				col.Scale = 1
			}
		} else {
			col.Scale = accelUnits[unit]
			if !hasUnit {
				col.Scale = 1
			}
		}
		h.cols = append(h.cols, col)
		h.hasUnit = append(h.hasUnit, hasUnit)
	}
	return h, nil
}

func knownUnitsList(time bool) string {
	if time {
		return "s, ms"
	}
	return "m/s^2 (m/s2, m/s², m s^-2), mm/s^2, g"
}

// validUTF8 reports whether b is valid UTF-8 (for notes and the header).
func validUTF8(b []byte) bool { return utf8.Valid(b) }
