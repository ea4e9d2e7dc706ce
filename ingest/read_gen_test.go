package ingest

import (
	"io"
	"math"
	"math/rand/v2"
	"strconv"
)

// The log generator of the tests and benchmarks: the lead's CSV writer's
// format (notes, "name [unit]" header, strconv 'g' with 10 digits, '\n').

const genHeader = "time [s],pan_f [m/s^2],pan_r [m/s^2],body_front [g],body_rear [g]\n"

// genLog streams a synthetic 5-column rig log of about size bytes at 1 kHz:
// random pans, body channels as slow sines plus noise, in g.
type genLog struct {
	size    int64
	written int64
	row     int
	rng     *rand.Rand
	buf     []byte
	off     int
	started bool
}

func newGenLog(size int64, seed uint64) *genLog {
	return &genLog{size: size, rng: rand.New(rand.NewPCG(seed, 7))}
}

func (g *genLog) fill() {
	g.buf = g.buf[:0]
	g.off = 0
	if !g.started {
		g.started = true
		g.buf = append(g.buf, "# synthetic rig log\n# fs 1000 Hz\n"...)
		g.buf = append(g.buf, genHeader...)
	}
	for range 256 {
		t := float64(g.row) / 1000
		g.buf = strconv.AppendFloat(g.buf, t, 'g', 10, 64)
		for c := range 4 {
			g.buf = append(g.buf, ',')
			var v float64
			switch c {
			case 0, 1:
				v = g.rng.NormFloat64() * 1.5
			default:
				v = 0.05*math.Sin(2*math.Pi*1.2*t+float64(c)) + 0.01*g.rng.NormFloat64()
			}
			g.buf = strconv.AppendFloat(g.buf, v, 'g', 10, 64)
		}
		g.buf = append(g.buf, '\n')
		g.row++
	}
}

func (g *genLog) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		if g.off == len(g.buf) {
			if g.written >= g.size {
				break
			}
			g.fill()
		}
		c := copy(p[n:], g.buf[g.off:])
		g.off += c
		n += c
		g.written += int64(c)
	}
	if n == 0 {
		return 0, io.EOF
	}
	return n, nil
}

// genBytes returns a whole generated log of about size bytes.
func genBytes(size int64, seed uint64) []byte {
	b, _ := io.ReadAll(newGenLog(size, seed))
	return b
}
