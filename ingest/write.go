package ingest

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// LogColumn is one column for WriteLog: a name, the unit to write it in, and
// its samples in SI units.
type LogColumn struct {
	Name string
	Unit string    // a unit the reader accepts: "m/s^2", "g" or "mm/s^2"
	Data []float64 // SI (m/s^2)
}

// writeDigits is the number of significant digits written per value: enough
// that a round trip through the text keeps 1e-10 relative accuracy.
const writeDigits = 10

// WriteLog writes a log in the CSV dialect that Open reads: "# " note lines,
// a header "time [s],name [unit],...", then one row per sample with the time
// t0S + i/rateHz, comma-delimited, '\n' line ends. All columns must have the
// same length. The output depends only on the arguments, byte for byte.
func WriteLog(w io.Writer, notes []string, rateHz, t0S float64, cols []LogColumn) error {
	if len(cols) == 0 {
		panic("ingest: WriteLog needs at least one column")
	}
	n := len(cols[0].Data)
	scale := make([]float64, len(cols))
	for i, c := range cols {
		if len(c.Data) != n {
			panic(fmt.Sprintf("ingest: column %q has %d samples, column %q has %d", c.Name, len(c.Data), cols[0].Name, n))
		}
		s, ok := accelUnits[c.Unit]
		if !ok {
			return fmt.Errorf("unknown unit %q for column %q", c.Unit, c.Name)
		}
		scale[i] = s
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	for _, note := range notes {
		for _, line := range strings.Split(note, "\n") {
			bw.WriteString("# ")
			bw.WriteString(line)
			bw.WriteByte('\n')
		}
	}
	bw.WriteString("time [s]")
	for _, c := range cols {
		fmt.Fprintf(bw, ",%s [%s]", c.Name, c.Unit)
	}
	bw.WriteByte('\n')
	buf := make([]byte, 0, 32)
	for i := 0; i < n; i++ {
		buf = strconv.AppendFloat(buf[:0], t0S+float64(i)/rateHz, 'g', writeDigits, 64)
		bw.Write(buf)
		for j, c := range cols {
			buf = append(buf[:0], ',')
			buf = strconv.AppendFloat(buf, c.Data[i]/scale[j], 'g', writeDigits, 64)
			bw.Write(buf)
		}
		bw.WriteByte('\n')
	}
	return bw.Flush()
}
