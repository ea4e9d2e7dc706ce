package modal

import (
	"fmt"
	"math"
	"math/cmplx"
	"runtime"
	"sort"
	"sync"

	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/spectral"
)

// band is the fit's view of an FRFSet: the usable bins in the band, with
// each FRF (output o, input i) flattened to one index p = o*inputs + i.
type band struct {
	set   *FRFSet
	bins  []int          // indices into set.FreqHz
	omega []float64      // rad/s at each bin
	h     [][]complex128 // [p][n]
	sigma [][]float64    // [p][n], per real component
	loHz  float64
	hiHz  float64
	pairs int
}

func newBand(set *FRFSet, loHz, hiHz float64) (*band, int) {
	b := &band{set: set, loHz: loHz, hiHz: hiHz, pairs: set.outputs() * set.inputs()}
	skipped := 0
	for k, f := range set.FreqHz {
		if !spectral.InBand([2]float64{loHz, hiHz}, f) || f <= 0 {
			continue
		}
		if !set.usable(k) {
			skipped++
			continue
		}
		b.bins = append(b.bins, k)
		b.omega = append(b.omega, 2*math.Pi*f)
	}
	b.h = make([][]complex128, b.pairs)
	b.sigma = make([][]float64, b.pairs)
	for o := range set.outputs() {
		for i := range set.inputs() {
			p := o*set.inputs() + i
			for _, k := range b.bins {
				b.h[p] = append(b.h[p], set.H[o][i][k])
				b.sigma[p] = append(b.sigma[p], set.SigmaAbs[o][i][k])
			}
		}
	}
	return b, skipped
}

// lscfPoles returns the poles (rad/s, Im > 0) of a common-denominator
// rational fraction polynomial model of the given order (the degree of the
// denominator) fitted to every FRF of the band at once.
//
// Each FRF p is modelled as B_p(x)/A(x) in the scaled Laplace variable
// x = i omega/omega_hi, with real polynomial coefficients of degree order
// (Richardson & Formenti's rational fraction polynomial, in the monomial
// basis; scaling by the band's upper edge keeps |x| <= 1). The linearised
// equation error w_pk (B_p(x_k) - H_pk A(x_k)), w_pk = 1/sigma_pk, is
// minimised in least squares the LSCF way: the numerator coefficients are
// eliminated FRF by FRF (reduced normal equations
// M = sum_p T_p - S_p^T R_p^-1 S_p), the highest denominator coefficient is
// fixed to one, and the poles are omega_hi times the roots of A (companion
// matrix, gonum's mat.Eigen). A z-domain basis (exp(i omega Ts)) was tried
// first and dropped: a continuous-time rational FRF is not rational in z,
// so heavily damped modes needed excess order and the poles wandered with
// the order (measured on the damped round-trip car of the design notes).
//
// References: Richardson & Formenti, IMAC 1982; Guillaume et al., IMAC 2003
// (see the package documentation).
//
// Each pole's shape is the dominant left singular vector of its residue
// matrix (outputs x inputs) B_p(x_r)/A'(x_r), the numerators being
// recovered from the reduced equations, b_p = -R_p^-1 S_p a; the
// stabilisation check compares these shapes between orders by the MAC.
//
// plain holds the first, unweighted pass's sums at an order of at least
// order (newPlainSums).
func lscfPoles(b *band, plain *plainSums, order int) ([]complex128, [][]complex128, error) {
	ws := 2 * math.Pi * b.hiHz
	extra := make([]float64, len(b.omega)) // Sanathanan-Koerner weights 1/|A_prev|^2
	var a *mat.VecDense
	var rs []*mat.Dense
	for it := 0; it <= skIterations; it++ {
		var err error
		if it == 0 {
			a, rs, err = denominator(b, order, nil, plain) // no weights yet
		} else {
			a, rs, err = denominator(b, order, extra, nil)
		}
		if err != nil {
			return nil, nil, err
		}
		mean := 0.0
		for n, om := range b.omega {
			x := complex(0, om/ws)
			v := complex(1, 0) // monic: a_order = 1
			for j := order - 1; j >= 0; j-- {
				v = v*x + complex(a.AtVec(j), 0)
			}
			av := cmplx.Abs(v)
			extra[n] = 1 / (av * av)
			mean += extra[n]
		}
		mean /= float64(len(extra))
		for n := range extra {
			extra[n] /= mean
		}
	}
	poles, err := roots(a, order, ws)
	if err != nil {
		return nil, nil, err
	}
	return poles, poleShapes(b, a, rs, poles, ws), nil
}

// poleShapes returns the shape of each pole (rad/s) of the monic
// denominator a: the dominant left singular vector of the residue matrix
// B_p(x)/A'(x) at x = pole/ws, with the numerator coefficients
// b_p = -rs[p] [a; 1].
func poleShapes(b *band, a *mat.VecDense, rs []*mat.Dense, poles []complex128, ws float64) [][]complex128 {
	order := a.Len()
	full := mat.NewVecDense(order+1, nil)
	for j := range order {
		full.SetVec(j, a.AtVec(j))
	}
	full.SetVec(order, 1)
	num := make([]*mat.VecDense, b.pairs)
	for p := range num {
		num[p] = mat.NewVecDense(order+1, nil)
		num[p].MulVec(rs[p], full)
		num[p].ScaleVec(-1, num[p])
	}
	no, ni := b.set.outputs(), b.set.inputs()
	shapes := make([][]complex128, len(poles))
	for r, lam := range poles {
		x := lam / complex(ws, 0)
		// A'(x) = sum_j j a_j x^(j-1).
		var da complex128
		for j := order; j >= 1; j-- {
			da = da*x + complex(float64(j)*full.AtVec(j), 0)
		}
		res := make([][]complex128, no)
		for o := range no {
			res[o] = make([]complex128, ni)
			for i := range ni {
				var bv complex128
				c := num[o*ni+i]
				for j := order; j >= 0; j-- {
					bv = bv*x + complex(c.AtVec(j), 0)
				}
				res[o][i] = bv / da
			}
		}
		_, shapes[r] = complexSVD(res, nil, true)
	}
	return shapes
}

// denominator solves the reduced normal equations of lscfPoles for the
// monic denominator's lower coefficients a_0..a_{order-1}, each bin's
// weight multiplied by extra[n]; with plain not nil, the sums are plain's
// unweighted ones instead (extra is then not used). It also returns, per
// FRF p, R_p^-1 S_p, from which the numerator coefficients follow.
func denominator(b *band, order int, extra []float64, plain *plainSums) (*mat.VecDense, []*mat.Dense, error) {
	n1 := order + 1
	M := mat.NewSymDense(n1, nil)
	// The sums of R, S and T run over every bin: plain row-major slices
	// (R and T upper triangles only), wrapped as matrices once per pair.
	rSum := make([]float64, n1*n1)
	sSum := make([]float64, n1*n1)
	tSum := make([]float64, n1*n1)
	R := mat.NewSymDense(n1, rSum)
	S := mat.NewDense(n1, n1, sSum)
	T := mat.NewSymDense(n1, tSum)
	var chol mat.Cholesky
	var prod mat.Dense
	rs := make([]*mat.Dense, b.pairs)
	var sc sumScratch
	for p := range b.pairs {
		if plain != nil {
			// the sums without reweighting, as the sweep's highest order
			// gave them
			plain.sub(p, order, rSum, sSum, tSum)
		} else {
			clear(rSum)
			clear(sSum)
			clear(tSum)
			sc.add(b, p, n1, extra, rSum, sSum, tSum)
		}
		if !chol.Factorize(R) {
			return nil, nil, fmt.Errorf("fraction polynomial order %d: the numerator normal equations are singular (too few bins or too high an order)", order)
		}
		tmp := mat.NewDense(n1, n1, nil)
		if err := chol.SolveTo(tmp, S); err != nil {
			return nil, nil, fmt.Errorf("fraction polynomial order %d: %w", order, err)
		}
		rs[p] = tmp
		prod.Mul(S.T(), tmp)
		for j := range n1 {
			for l := j; l < n1; l++ {
				M.SetSym(j, l, M.At(j, l)+T.At(j, l)-prod.At(j, l))
			}
		}
	}
	// Fix a_order = 1: M[:o,:o] a = -M[:o,o].
	A := mat.NewDense(order, order, nil)
	rhs := mat.NewVecDense(order, nil)
	for j := range order {
		for l := range order {
			A.Set(j, l, M.At(j, l))
		}
		rhs.SetVec(j, -M.At(j, order))
	}
	var a mat.VecDense
	if err := a.SolveVec(A, rhs); err != nil {
		return nil, nil, fmt.Errorf("fraction polynomial order %d: the denominator equations are singular: %w", order, err)
	}
	return &a, rs, nil
}

// sumScratch holds the per-bin powers of sumScratch.add.
type sumScratch struct{ sp []float64 }

// add adds FRF p's terms of the sums R, S and T of order n1-1 over every
// bin of the band to rSum, sSum and tSum (row-major n1 x n1; R and T upper
// triangles only), each bin's weight multiplied by extra[n] (nil: by one).
//
// x = i u is purely imaginary, so x^j = i^j u^j and conj(x^j) x^l =
// i^(l-j) u^(j+l): real when j and l have the same parity, imaginary
// otherwise. The sums take that form: sp[j] is u^j (by repeated products,
// as the powers of x would be) with the sign of i^j's real or imaginary
// unit (+ + - - ...), so that sp[j] sp[l] is the product the complex
// arithmetic would round, with its sign; the terms a zero would add are
// left out. The entries of order n are those of any higher order's leading
// n+1 rows and columns, bit for bit: each sums the same terms in bin order.
func (sc *sumScratch) add(b *band, p, n1 int, extra []float64, rSum, sSum, tSum []float64) {
	if cap(sc.sp) < n1 {
		sc.sp = make([]float64, n1)
	}
	sp := sc.sp[:n1]
	ws := 2 * math.Pi * b.hiHz
	for n, om := range b.omega {
		num := 1.0
		if extra != nil {
			num = extra[n]
		}
		w2 := num / (b.sigma[p][n] * b.sigma[p][n])
		hr, hi := real(b.h[p][n]), imag(b.h[p][n])
		wa := w2 * (hr*hr + hi*hi) // w2 |H|^2
		u := om / ws
		pw := 1.0
		sp[0] = 1
		for j := 1; j < n1; j++ {
			pw *= u
			sp[j] = pw
			if j%4 >= 2 {
				sp[j] = -pw
			}
		}
		for j, spj := range sp {
			rRow, sRow, tRow := rSum[j*n1:][:n1], sSum[j*n1:][:n1], tSum[j*n1:][:n1]
			// same parity: q = conj(x^j) x^l, real; S[j][l] =
			// Re(conj(X_j)^T Y_l) with Y = -w H x^l
			for l := j & 1; l < j; l += 2 {
				sRow[l] -= w2 * ((spj * sp[l]) * hr)
			}
			for l := j; l < len(sp); l += 2 {
				q := spj * sp[l]
				rRow[l] += w2 * q
				tRow[l] += wa * q
				sRow[l] -= w2 * (q * hr)
			}
			// other parity: q = +-i sp[j] sp[l] (+ for even j), so
			// Re(q H) = -+ sp[j] sp[l] Im(H)
			if j&1 == 0 {
				for l := 1; l < len(sp); l += 2 {
					sRow[l] += w2 * ((spj * sp[l]) * hi)
				}
			} else {
				for l := 0; l < len(sp); l += 2 {
					sRow[l] -= w2 * ((spj * sp[l]) * hi)
				}
			}
		}
	}
}

// plainSums holds, per FRF, the sums R, S and T of lscfPoles' first,
// unweighted pass at the sweep's highest order: every lower order's first
// pass takes its leading rows and columns instead of summing over the bins
// again (one pass of the four per order is saved).
type plainSums struct {
	order   int
	r, s, t [][]float64 // [p], row-major (order+1)^2
}

// newPlainSums sums every FRF's terms at the given order, the FRFs side by
// side.
func newPlainSums(b *band, order int) *plainSums {
	n1 := order + 1
	ps := &plainSums{order: order, r: make([][]float64, b.pairs), s: make([][]float64, b.pairs), t: make([][]float64, b.pairs)}
	var wg sync.WaitGroup
	for p := range b.pairs {
		ps.r[p], ps.s[p], ps.t[p] = make([]float64, n1*n1), make([]float64, n1*n1), make([]float64, n1*n1)
		wg.Go(func() {
			var sc sumScratch
			sc.add(b, p, n1, nil, ps.r[p], ps.s[p], ps.t[p])
		})
	}
	wg.Wait()
	return ps
}

// sub copies FRF p's sums of the given order (at most ps.order) into the
// row-major (order+1)^2 slices r, s and t.
func (ps *plainSums) sub(p, order int, r, s, t []float64) {
	n1, m1 := order+1, ps.order+1
	for j := range n1 {
		copy(r[j*n1:(j+1)*n1], ps.r[p][j*m1:])
		copy(s[j*n1:(j+1)*n1], ps.s[p][j*m1:])
		copy(t[j*n1:(j+1)*n1], ps.t[p][j*m1:])
	}
}

// roots returns the oscillating roots (Im > 0) of the monic polynomial with
// lower coefficients a, scaled by ws to poles in rad/s, by increasing modulus.
func roots(a *mat.VecDense, order int, ws float64) ([]complex128, error) {
	// Companion matrix of x^order + a_{order-1} x^{order-1} + ... + a_0.
	C := mat.NewDense(order, order, nil)
	for j := range order {
		C.Set(0, j, -a.AtVec(order-1-j))
		if j > 0 {
			C.Set(j, j-1, 1)
		}
	}
	var eig mat.Eigen
	if !eig.Factorize(C, mat.EigenNone) {
		return nil, fmt.Errorf("fraction polynomial order %d: the root finder did not converge", order)
	}
	var poles []complex128
	for _, x := range eig.Values(nil) {
		// Real roots do not oscillate and are not modes.
		if imag(x) <= realRootTol*cmplx.Abs(x) {
			continue
		}
		poles = append(poles, x*complex(ws, 0))
	}
	sort.Slice(poles, func(i, j int) bool { return cmplx.Abs(poles[i]) < cmplx.Abs(poles[j]) })
	return poles, nil
}

// skIterations is the number of Sanathanan-Koerner reweightings of the
// linearised fit: each divides the equation error by the previous
// denominator, which removes most of the linearisation's bias
// (C. K. Sanathanan and J. Koerner, "Transfer function synthesis as a ratio
// of two complex polynomials", IEEE Trans. Autom. Control 8(1):56-58, 1963,
// doi:10.1109/TAC.1963.1105517).
const skIterations = 3

// realRootTol is the relative imaginary part below which a root of the
// LSCF denominator counts as real.
const realRootTol = 1e-9

// PoleStatus classifies a pole of the stabilisation diagram.
type PoleStatus int

// Pole statuses, from least to most settled.
const (
	// PoleNew: no pole of the previous order lies near it in frequency
	// with a shape of MAC StabilityMAC or more.
	PoleNew PoleStatus = iota
	// PoleFrequencyStable: a previous-order pole has its frequency within
	// StabilityFrequencyTol and its shape within StabilityMAC, but not its
	// damping.
	PoleFrequencyStable
	// PoleStable: frequency within StabilityFrequencyTol, damping ratio
	// within StabilityDampingTol and shape within StabilityMAC of a
	// previous-order pole.
	PoleStable
)

// A pole whose frequency (and damping) agree with a previous-order pole but
// whose shape does not is PoleNew: a noise pole can hold its frequency
// across orders while its shape wanders.

func (s PoleStatus) String() string {
	switch s {
	case PoleFrequencyStable:
		return "frequency-stable"
	case PoleStable:
		return "stable"
	}
	return "new"
}

// Stabilisation tolerances between consecutive model orders (the usual
// choice in the trade [memory]: frequency 1 %, damping 5 %, MAC of the
// shapes at least 0.98).
const (
	StabilityFrequencyTol = 0.01
	StabilityDampingTol   = 0.05
	StabilityMAC          = 0.98
)

// StabilisationPoint is one pole of one model order, the data of a
// stabilisation chart.
type StabilisationPoint struct {
	Order              int // denominator degree of the LSCF model
	Pole               complex128
	NaturalFrequencyHz float64
	DampingRatio       float64
	// Physical is true for a stable pole (Re < 0) with damping ratio in
	// (0, 1) and natural frequency inside the band.
	Physical bool
	Status   PoleStatus
	// Shape is the pole's shape at the sensors (lscfPoles), unscaled; MAC is
	// the largest MAC of Shape with a previous-order pole within
	// StabilityFrequencyTol (0: none).
	Shape []complex128
	MAC   float64
}

// stabilise sweeps the LSCF orders 2..maxOrder and classifies the poles.
// The orders are fitted concurrently (up to GOMAXPROCS at once, highest
// order first, as it takes longest) and classified in order afterwards, so
// the result does not depend on the scheduling.
//
// Very clean data makes the higher orders' equations singular (the model
// needs no more poles than the data hold): the sweep then ends at the last
// order that solved, provided that is at least minSweepOrder, and returns
// it as reached.
func stabilise(b *band, maxOrder int) (pts []StabilisationPoint, reached int, err error) {
	type orderFit struct {
		poles  []complex128
		shapes [][]complex128
		err    error
	}
	fits := make([]orderFit, maxOrder+1)
	plain := newPlainSums(b, maxOrder)
	orders := make(chan int, maxOrder)
	for order := maxOrder; order >= 2; order-- {
		orders <- order
	}
	close(orders)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), maxOrder-1) {
		wg.Go(func() {
			for order := range orders {
				f := &fits[order]
				f.poles, f.shapes, f.err = lscfPoles(b, plain, order)
			}
		})
	}
	wg.Wait()
	var prev []StabilisationPoint
	for order := 2; order <= maxOrder; order++ {
		poles, shapes, err := fits[order].poles, fits[order].shapes, fits[order].err
		if err != nil {
			if order > minSweepOrder {
				return pts, order - 1, nil
			}
			return nil, 0, err
		}
		var cur []StabilisationPoint
		for r, lam := range poles {
			p := StabilisationPoint{Order: order, Pole: lam, Shape: shapes[r]}
			w := cmplx.Abs(lam)
			p.NaturalFrequencyHz = w / (2 * math.Pi)
			p.DampingRatio = -real(lam) / w
			p.Physical = p.DampingRatio > 0 && p.DampingRatio < 1 &&
				p.NaturalFrequencyHz >= b.loHz && p.NaturalFrequencyHz <= b.hiHz
			p.classify(prev)
			cur = append(cur, p)
		}
		pts = append(pts, cur...)
		prev = cur
	}
	return pts, maxOrder, nil
}

// classify sets p's Status and MAC against the poles of the previous
// order: the best agreement with any of them in frequency, shape (MAC) and
// damping, by the tolerances above.
func (p *StabilisationPoint) classify(prev []StabilisationPoint) {
	for _, q := range prev {
		if math.Abs(p.NaturalFrequencyHz-q.NaturalFrequencyHz) > StabilityFrequencyTol*q.NaturalFrequencyHz {
			continue
		}
		mac := body.MAC(p.Shape, q.Shape)
		p.MAC = math.Max(p.MAC, mac)
		if !(mac >= StabilityMAC) {
			continue
		}
		st := PoleFrequencyStable
		if math.Abs(p.DampingRatio-q.DampingRatio) <= StabilityDampingTol*math.Abs(q.DampingRatio) {
			st = PoleStable
		}
		p.Status = max(p.Status, st)
	}
}

// minSweepOrder is the lowest order a sweep must reach for its
// stabilisation check to mean anything: two modes need order 4, and a
// stable pole must persist over several orders beyond it.
const minSweepOrder = 8

// poleCluster is a group of stable physical poles of different orders
// with nearly the same natural frequency.
type poleCluster struct {
	members []StabilisationPoint
}

// clusterPoles groups the physical poles whose status is at least least
// (PoleStable, or PoleFrequencyStable to admit poles whose damping still
// wanders between orders): sorted by natural frequency, a pole joins the
// current cluster when it lies within 2*StabilityFrequencyTol of the
// cluster's last member. Clusters are returned by decreasing size (number of
// orders at which the pole is stable).
func clusterPoles(pts []StabilisationPoint, least PoleStatus) []poleCluster {
	var st []StabilisationPoint
	for _, p := range pts {
		if p.Physical && p.Status >= least {
			st = append(st, p)
		}
	}
	sort.Slice(st, func(i, j int) bool { return st[i].NaturalFrequencyHz < st[j].NaturalFrequencyHz })
	var cs []poleCluster
	for _, p := range st {
		if n := len(cs); n > 0 {
			last := cs[n-1].members[len(cs[n-1].members)-1]
			if p.NaturalFrequencyHz-last.NaturalFrequencyHz <= 2*StabilityFrequencyTol*last.NaturalFrequencyHz {
				cs[n-1].members = append(cs[n-1].members, p)
				continue
			}
		}
		cs = append(cs, poleCluster{members: []StabilisationPoint{p}})
	}
	sort.SliceStable(cs, func(i, j int) bool { return len(cs[i].members) > len(cs[j].members) })
	return cs
}

// representative returns the member with the median natural frequency.
func (c poleCluster) representative() StabilisationPoint {
	m := append([]StabilisationPoint(nil), c.members...)
	sort.Slice(m, func(i, j int) bool { return m[i].NaturalFrequencyHz < m[j].NaturalFrequencyHz })
	return m[len(m)/2]
}

// lowestOrder returns the lowest order at which the cluster has a member.
func (c poleCluster) lowestOrder() int {
	o := math.MaxInt
	for _, m := range c.members {
		o = min(o, m.Order)
	}
	return o
}
