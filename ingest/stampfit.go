package ingest

import "math"

// stampFit fits the straight line t_i = a + i*dt through every time stamp of
// a log by least squares (i = 0, 1, ... the row index), in one streaming
// pass and constant memory. Its slope is the log's sample step.
//
// The row indices are consecutive integers, so their sums are known in
// closed form and only sum(r_i) and sum(i*r_i) are accumulated, of the
// residuals r_i = t_i - (t0 + i*dt0) from a centring line (the first stamp
// and the early reference step): they stay near zero, so the sums carry no
// large terms that cancel. A run of rows is summed with its local index k
// (i = i0 + k) in plain float64, sum(i*r) = i0*sum(r) + sum(k*r), and the
// runs' sums are added with Neumaier's compensated summation, so the
// rounding of millions of additions does not build up. The slope is
//
//	dt = dt0 + (sum(i*r) - ibar*sum(r)) / Sxx,  ibar = (N-1)/2,  Sxx = N(N^2-1)/12,
//
// the ordinary least-squares slope written with centred indices.
//
// References:
//   - A. Neumaier, "Rundungsfehleranalyse einiger Verfahren zur Summation
//     endlicher Summen", Z. Angew. Math. Mech. 54:39-51, 1974 (the
//     compensated sum).
//   - N. J. Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
//     SIAM, 2002, Sec. 4.3 (compensated summation; from memory).
type stampFit struct {
	n       int
	t0, dt0 float64 // the centring line
	sr, sir compensatedSum
}

// compensatedSum is a running sum with Neumaier's compensation term.
type compensatedSum struct{ s, c float64 }

func (k *compensatedSum) add(x float64) {
	t := k.s + x
	if math.Abs(k.s) >= math.Abs(x) {
		k.c += (k.s - t) + x
	} else {
		k.c += (x - t) + k.s
	}
	k.s = t
}

func (k compensatedSum) value() float64 { return k.s + k.c }

// start fixes the centring line: t0 the first stamp, dt0 a step near the
// log's (the reference step).
func (f *stampFit) start(t0, dt0 float64) {
	*f = stampFit{t0: t0, dt0: dt0}
}

// addRun takes the stamps of rows f.n, f.n+1, ... in order.
func (f *stampFit) addRun(t []float64) {
	if len(t) == 0 {
		return
	}
	i0 := float64(f.n)
	base := f.t0 + i0*f.dt0
	var a, b float64
	for k, ti := range t {
		r := ti - (base + float64(k)*f.dt0)
		a += r
		b += float64(k) * r
	}
	f.sr.add(a)
	f.sir.add(i0*a + b)
	f.n += len(t)
}

// addOne takes the stamp of row f.n.
func (f *stampFit) addOne(t float64) {
	r := t - (f.t0 + float64(f.n)*f.dt0)
	f.sr.add(r)
	f.sir.add(float64(f.n) * r)
	f.n++
}

// step returns the least-squares step (s); it needs two stamps or more.
func (f *stampFit) step() float64 {
	n := float64(f.n)
	sxx := n * (n*n - 1) / 12
	return f.dt0 + (f.sir.value()-(n-1)/2*f.sr.value())/sxx
}
