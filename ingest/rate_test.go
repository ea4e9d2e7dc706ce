package ingest

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"strings"
	"testing"
)

// stampedLog writes n rows at rateHz from t0S with the time written to a
// fixed number of decimals ("%.*f", as acquisition exports do) and one
// channel, a 1.3 Hz sine in m/s^2; edit, when not nil, may change a row's
// time before it is written.
func stampedLog(n int, rateHz, t0S float64, decimals int, edit func(i int, t float64) float64) string {
	var b strings.Builder
	b.Grow(n * 24)
	b.WriteString("time [s],body [m/s^2]\n")
	for i := range n {
		t := t0S + float64(i)/rateHz
		if edit != nil {
			t = edit(i, t)
		}
		fmt.Fprintf(&b, "%.*f,%.6f\n", decimals, t, math.Sin(2*math.Pi*1.3*float64(i)/rateHz))
	}
	return b.String()
}

// roundingBounds are the relative errors of a least-squares step fitted to
// n stamps of step dt rounded to u [derived]: at worst, whatever the
// pattern of the rounding errors r_i (|r_i| <= u/2), the slope error
// sum((i-ibar) r_i)/Sxx is at most (u/2) sum|i-ibar| / Sxx =
// 1.5 u n/(n^2-1); with independent errors uniform over +-u/2 (sd u/sqrt(12)),
// its sd is (u/sqrt(12))/sqrt(Sxx) = u/sqrt(n(n^2-1)), about u n^-1.5.
func roundingBounds(n int, dt, u float64) (worst, sd float64) {
	N := float64(n)
	return 1.5 * u * N / (N*N - 1) / dt, u / math.Sqrt(N*(N*N-1)) / dt
}

// The sample rate of a log with time written to 4 or 5 decimals comes from
// every stamp: within 1e-6 of the truth (the target) and within the
// derived worst case, where the median of the first steps (the early
// estimate, Block.SampleRateHz) is off by up to a unit of the last decimal
// per step.
func TestSampleRateFromEveryStamp(t *testing.T) {
	const durationS = 300
	for _, fs := range []float64{200, 256, 512} {
		for _, d := range []int{4, 5} {
			n := durationS*int(fs) + 1
			r, err := NewReader(strings.NewReader(stampedLog(n, fs, 0, d, nil)), "stamped.csv", -1, Options{})
			if err != nil {
				t.Fatal(err)
			}
			early := 0.0
			sum, err := r.Stream(func(b Block) error {
				early = b.SampleRateHz
				return nil
			})
			if err != nil {
				t.Fatalf("%g Hz, %d decimals: %v", fs, d, err)
			}
			rel := sum.SampleRateHz/fs - 1
			worst, sd := roundingBounds(n, 1/fs, math.Pow(10, -float64(d)))
			t.Logf("%g Hz, %d decimals, %d stamps: fitted %.10g Hz (%+.2e; worst case %.1e, sd %.1e), first steps' median %.6g Hz (%+.2e)",
				fs, d, n, sum.SampleRateHz, rel, worst, sd, early, early/fs-1)
			if math.Abs(rel) > 1e-6 || math.Abs(rel) > worst {
				t.Errorf("%g Hz, %d decimals: rate %.10g Hz, %.2e off; want within 1e-6 and the worst case %.2e", fs, d, sum.SampleRateHz, rel, worst)
			}
		}
	}
}

// The streaming fit keeps full accuracy over an hour at 1 kHz of stamps
// that start at 86400 s (a time-of-day clock) and are rounded to 5
// decimals, fed in runs of random length and row by row, from a centring
// step 1 % off: against the exact least-squares slope of the same stamps
// computed in integer arithmetic (the stamps are whole multiples of 1e-5 s).
func TestStampFitLongLog(t *testing.T) {
	const n, dt, t0, unit = 3_600_000, 1e-3, 86400.0, 1e-5
	m := make([]int64, n) // stamps in units of 1e-5 s
	ts := make([]float64, n)
	for i := range m {
		m[i] = int64(math.Round((t0 + float64(i)*dt*1.0000003) / unit))
		ts[i] = float64(m[i]) * unit
	}
	// exact: slope = sum((2i-n+1) m_i) unit / (2 Sxx), Sxx = n(n^2-1)/12
	num, part := new(big.Int), int64(0)
	for i, v := range m {
		part += int64(2*i-n+1) * v
		if i%64 == 63 { // |term| < 3.6e6 * 8.7e9: 64 of them fit an int64
			num.Add(num, big.NewInt(part))
			part = 0
		}
	}
	num.Add(num, big.NewInt(part))
	N := big.NewInt(n)
	sxx2 := new(big.Int).Mul(N, new(big.Int).Sub(new(big.Int).Mul(N, N), big.NewInt(1)))
	sxx2.Div(sxx2, big.NewInt(6)) // 2 Sxx, exact: n(n^2-1) is divisible by 6
	exact, _ := new(big.Rat).SetFrac(num, sxx2).Float64()
	exact *= unit

	var f stampFit
	f.start(ts[0], dt*1.01)
	rng := rand.New(rand.NewPCG(3, 14))
	for i := 0; i < n; {
		if rng.IntN(4) == 0 {
			f.addOne(ts[i])
			i++
			continue
		}
		k := min(n-i, 1+rng.IntN(20000))
		f.addRun(ts[i : i+k])
		i += k
	}
	got := f.step()
	t.Logf("fitted step %.17g s, exact %.17g s (%+.1e relative)", got, exact, got/exact-1)
	if math.Abs(got/exact-1) > 1e-12 {
		t.Errorf("fitted step %.17g s, exact %.17g s: %.1e relative", got, exact, got/exact-1)
	}
}

// The jitter check allows for the stamps' rounding where the first steps
// show it, and only there.
func TestJitterCheckKnowsStampResolution(t *testing.T) {
	// 256 Hz to 4 decimals: steps of 0.0039 s and 0.0040 s (2.6 % apart) read
	l := mustRead(t, stampedLog(2560, 256, 0, 4, nil), Options{})
	if math.Abs(l.Summary.SampleRateHz/256-1) > 1e-6 {
		t.Errorf("256 Hz to 4 decimals: %.8g Hz", l.Summary.SampleRateHz)
	}
	// ... but a stamp 0.2 ms late (5 % of a step) is still an error at its line
	late := func(i int, t float64) float64 {
		if i == 1000 {
			return t + 0.0002
		}
		return t
	}
	_, err := readString(stampedLog(2560, 256, 0, 4, late), Options{})
	var pe *ParseError
	if !errors.As(err, &pe) || !errors.Is(err, ErrNonUniform) || pe.Line != 1002 ||
		!strings.Contains(pe.Detail, "100 µs more for the time stamps' rounding") {
		t.Errorf("a 5 %% jitter at 256 Hz to 4 decimals: %v", err)
	}
	// 200 Hz to 4 decimals: the stamps are exact, the first steps all equal,
	// so no allowance: a step one unit (2 %) long is an error, though the
	// allowance would have covered it
	long := func(i int, t float64) float64 {
		if i >= 500 {
			return t + 0.0001
		}
		return t
	}
	_, err = readString(stampedLog(1000, 200, 0, 4, long), Options{})
	if !errors.As(err, &pe) || !errors.Is(err, ErrNonUniform) || pe.Line != 502 ||
		!strings.Contains(pe.Detail, "2.0 % off; at most 1 % is accepted; the step is off by about one unit") {
		t.Errorf("a 2 %% jitter in exact stamps: %v", err)
	}
	// 3 kHz to 4 decimals: a unit of the last place is 30 % of a step, too
	// coarse to tell rounding from jitter
	_, err = readString(stampedLog(3000, 3000, 0, 4, nil), Options{})
	if !errors.As(err, &pe) || !errors.Is(err, ErrNonUniform) || !strings.Contains(pe.Detail, "too coarse to check it") {
		t.Errorf("3 kHz to 4 decimals: %v", err)
	}
	// time in ms: the unit is the column's (3 kHz written to 2 decimals of
	// ms rounds by 3 % of a step)
	var b strings.Builder
	b.WriteString("t [ms],a [g]\n")
	const n = 30000
	for i := range n {
		fmt.Fprintf(&b, "%.2f,%d\n", float64(i)/3, i%7)
	}
	l = mustRead(t, b.String(), Options{})
	worst, _ := roundingBounds(n, 1.0/3000, 1e-5)
	if rel := l.Summary.SampleRateHz/3000 - 1; math.Abs(rel) > worst {
		t.Errorf("3 kHz in ms to 2 decimals: %.8g Hz, %.1e off, worst case %.1e", l.Summary.SampleRateHz, rel, worst)
	}
}

func TestDecimalPlaces(t *testing.T) {
	for _, c := range []struct {
		in   string
		sep  byte
		want int
	}{
		{"0.0039", '.', 4}, {"0.00390", '.', 5}, {"-12.5", '.', 1}, {"12", '.', 0},
		{"3.9e-3", '.', 4}, {"39E-4", '.', 4}, {"1.2e3", '.', -2}, {"5e+2", '.', -2},
		{"0,00390625", ',', 8}, {"+7,5E-1", ',', 2},
	} {
		_, end, st, got := scanFloat([]byte(c.in), 0, c.sep, 0)
		if st != numOK || end != len(c.in) || got != c.want {
			t.Errorf("scanFloat(%q): %d decimal places (status %d, end %d), want %d", c.in, got, st, end, c.want)
		}
	}
	var pc placeCounts
	if _, ok := pc.mode(); ok {
		t.Error("mode of nothing")
	}
	for _, d := range []int{3, 4, 4, 3, 30, -2} {
		pc.add(d)
	}
	if d, _ := pc.mode(); d != 4 {
		t.Errorf("mode %d, want 4 (the larger of a tie)", d)
	}
}
