package ingest

import (
	"bytes"
	"encoding/binary"
	"math"
	"strconv"
	"unsafe"
)

// Why a hand-written number parser: strconv.ParseFloat takes a string, so
// each cell of a []byte line costs a conversion, and it is general (hex,
// underscores, "inf", long inputs), which a log cell never needs. Measured
// on the 2-core test machine (an AMD EPYC virtual machine, Go 1.26, medians
// of 10 runs of BenchmarkStrconvParseFloatCell and BenchmarkParseFloatCell):
// 34 ns a cell with strconv.ParseFloat against 18 ns here. Log cells are
// nearly always plain decimals with few digits (a DAQ's %g or %.6f, strconv
// 'g' with 10 digits), and for those there is an exact shortcut:
//
// When the decimal mantissa m (digits without the point) is below 2^53 it is
// exactly a float64, and so is 10^k for k <= 22. IEEE 754 multiplication and
// division are correctly rounded, so m*10^k and m/10^k are the correctly
// rounded values of the decimal: bit-identical to strconv.ParseFloat, which
// takes the same path (Clinger's fast path, "atof64exact" in strconv). Every
// other number (more than 19 digits, m >= 2^53, |exponent| > 22) goes to
// strconv.ParseFloat itself. FuzzParseFloat checks the two agree bit for bit.
//
// The grammar accepted is [+-] digits [sep digits] [(e|E) [+-] digits], with
// at least one mantissa digit, sep being '.' or the log's decimal comma.
// Anything else, including "nan", "inf", hex and empty cells, is rejected.

var pow10tab = [23]float64{
	1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
}

// number parse outcomes
const (
	numOK        = iota
	numBad       // not in the grammar
	numNotFinite // NaN/Inf spelled out, or out of float64 range
	numOtherSep  // uses the other decimal separator ('.' vs ',')
)

// parseFloat parses the whole of b (no surrounding spaces or quotes) with
// decimal separator sep ('.' or ',').
func parseFloat(b []byte, sep byte) (float64, int) {
	f, end, st, _ := scanFloat(b, 0, sep, 0)
	if st == numOK && end != len(b) {
		return 0, numBad
	}
	return f, st
}

// scanFloat parses the number that starts at b[i] and stops at the first
// byte that cannot continue it, returning the value, that byte's index, the
// outcome and the number's decimal places (the digits after the separator
// less the exponent, so one unit in its last place is 10^-places: "0.0039"
// 4, "3.9e-3" 4, "12" 0, "1.2e3" -2); the caller checks what follows (a
// delimiter, the line end). sep is the decimal separator; the other one of
// '.' and ',' (unless it is the delimiter delim) gives numOtherSep. It does
// not allocate on the fast path.
func scanFloat(b []byte, i int, sep, delim byte) (float64, int, int, int) {
	start := i
	n := len(b)
	// The sign without a branch: a signal's cells are negative about half
	// the time, at random, so a branch on it is mispredicted on about every
	// other cell. Measured on the 2-core test machine with
	// BenchmarkParseChunk (medians of 20, the rows through fastRow): 15.6 ns
	// a cell against 17.9 ns with a branch on '-' and '+'.
	var sign uint64 // the sign bit of the result
	if i < n {
		c := b[i]
		minus := b2u(c == '-')
		sign = minus << 63
		i += int(minus | b2u(c == '+'))
	}
	ds := i
	var mant uint64
	for i < n { // the integer part: usually a digit or two
		c := b[i] - '0'
		if c > 9 {
			break
		}
		mant = mant*10 + uint64(c)
		i++
	}
	// nd counts every mantissa digit, leading zeros too: at most 19 cannot
	// overflow mant; past that the number goes to strconv.
	nd := i - ds
	frac := 0 // digits after the separator, all in mant
	if i < n && b[i] == sep {
		i++
		fs := i
		// the fraction: a block of eight digits at once (SWAR, see
		// parse8), then the rest one by one
		if i+8 <= n {
			v := binary.LittleEndian.Uint64(b[i:])
			if is8Digits(v) {
				mant = mant*100000000 + parse8(v)
				i += 8
			}
		}
		for i < n {
			c := b[i] - '0'
			if c > 9 {
				break
			}
			mant = mant*10 + uint64(c)
			i++
		}
		frac = i - fs
		nd += frac
	} else if i < n && (b[i] == '.' || b[i] == ',') && b[i] != delim {
		return 0, i, numOtherSep, 0
	}
	if nd == 0 {
		return 0, i, classifyWord(b[start:], delim), 0
	}
	exp := 0
	if i < n && (b[i]|0x20) == 'e' {
		i++
		eneg := false
		if i < n && (b[i] == '+' || b[i] == '-') {
			eneg = b[i] == '-'
			i++
		}
		if i >= n || b[i]-'0' > 9 {
			return 0, i, numBad, 0
		}
		for ; i < n; i++ {
			c := b[i] - '0'
			if c > 9 {
				break
			}
			if exp < 100000 {
				exp = exp*10 + int(c)
			}
		}
		if eneg {
			exp = -exp
		}
	}
	e10 := exp - frac
	if nd <= 19 && mant < 1<<53 {
		f := float64(int64(mant)) // exact: mant < 2^53
		switch {
		case mant == 0:
		case e10 == 0:
		case e10 < 0 && e10 >= -22:
			f /= pow10tab[-e10]
		case e10 > 0 && e10 <= 22:
			f *= pow10tab[e10]
		default:
			f, st := slowFloat(b[start:i], sep)
			return f, i, st, -e10
		}
		// f >= 0: the sign bit makes it negative, "-0" -0 as in strconv
		return math.Float64frombits(math.Float64bits(f) | sign), i, numOK, -e10
	}
	f, st := slowFloat(b[start:i], sep)
	return f, i, st, -e10
}

// b2u is 1 for true and 0 for false (compiled without a branch).
func b2u(b bool) uint64 {
	if b {
		return 1
	}
	return 0
}

// is8Digits reports whether the eight bytes of v are all '0'..'9': bit 7
// of a byte's sum with 0x46 or its difference with 0x30 is set exactly when
// it is not a digit.
func is8Digits(v uint64) bool {
	return ((v+0x4646464646464646)|(v-0x3030303030303030))&0x8080808080808080 == 0
}

// parse8 converts eight ASCII digits, loaded little-endian, to their value
// with three multiplications (the SWAR method of fast_float: D. Lemire,
// "Number parsing at a gigabyte per second", Software: Practice and
// Experience 51(8), 2021, doi:10.1002/spe.2984).
func parse8(v uint64) uint64 {
	const mask = 0x000000FF000000FF
	const mul1 = 0x000F424000000064 // 100 + (1000000 << 32)
	const mul2 = 0x0000271000000001 // 1 + (10000 << 32)
	v -= 0x3030303030303030
	v = v*10 + v>>8
	return ((v&mask)*mul1 + ((v>>16)&mask)*mul2) >> 32
}

// slowFloat hands a number already checked against the grammar to
// strconv.ParseFloat.
func slowFloat(b []byte, sep byte) (float64, int) {
	var buf [64]byte
	s := b
	if sep != '.' {
		if len(b) <= len(buf) {
			s = buf[:len(b)]
		} else {
			s = make([]byte, len(b))
		}
		copy(s, b)
		for j, c := range s {
			if c == sep {
				s[j] = '.'
			}
		}
	}
	// The string aliases s only for the call: the error (which would keep
	// it) is dropped at once, so no copy is needed.
	f, err := strconv.ParseFloat(unsafe.String(unsafe.SliceData(s), len(s)), 64)
	if err != nil {
		// The grammar was checked, so the only error left is ErrRange:
		// overflow to Inf. (Underflow to zero or a subnormal is not an error
		// in strconv and not one here.)
		if math.IsInf(f, 0) {
			return 0, numNotFinite
		}
		return 0, numBad
	}
	return f, numOK
}

// classifyWord tells spelled-out non-finite values (nan, inf, infinity,
// any case, up to the delimiter or the line end) from other garbage. b may
// run on past the line (fastRow scans a chunk's buffer): the cut at '\n'
// keeps the look within the line.
func classifyWord(b []byte, delim byte) int {
	if j := bytes.IndexByte(b, '\n'); j >= 0 {
		b = b[:j]
	}
	if delim != 0 {
		if j := bytes.IndexByte(b, delim); j >= 0 {
			b = b[:j]
		}
	}
	b = bytes.TrimRight(b, " \t")
	i := 0
	if len(b) > 0 && (b[0] == '+' || b[0] == '-') {
		i = 1
	}
	w := b[i:]
	if len(w) > 8 {
		return numBad
	}
	var l [8]byte
	for j, c := range w {
		if 'A' <= c && c <= 'Z' {
			c += 'a' - 'A'
		}
		l[j] = c
	}
	switch string(l[:len(w)]) {
	case "nan", "inf", "infinity":
		return numNotFinite
	}
	return numBad
}

// placeCounts counts numbers by their decimal places (scanFloat), those
// outside 0..maxPlaces in the nearest end.
type placeCounts [maxPlaces + 1]int32

const maxPlaces = 24

func (c *placeCounts) add(places int) { c[min(max(places, 0), maxPlaces)]++ }

// merge adds the counts of o.
func (c *placeCounts) merge(o *placeCounts) {
	for i, n := range o {
		c[i] += n
	}
}

// mode returns the most common decimal places (the larger on a tie), and
// false when nothing was counted.
func (c *placeCounts) mode() (int, bool) {
	best := -1
	for i, n := range c {
		if n > 0 && (best < 0 || n >= c[best]) {
			best = i
		}
	}
	return best, best >= 0
}
