package decay

import (
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/identify/body"
)

// Stabilisation criteria between consecutive ERA orders, and grouping of
// stable poles across orders. The criteria are the usual ones of the trade
// [memory, design notes domain.md: df < 1 %, dzeta < 5 %, MAC > 0.98],
// with the damping tolerance widened for damping ratios near 0.3, where 5 %
// is 0.015 and sensor noise moves the ERA damping by about that much.
const (
	stableFreqTol   = 0.01 // relative change of natural frequency
	stableDampTol   = 0.10 // relative change of damping ratio
	stableMACMin    = 0.98 // MAC of the shapes at the sensors
	clusterFreqTol  = 0.03 // stable poles within 3 % in frequency ...
	clusterDampTol  = 0.05 // ... and 0.05 in damping ratio are one mode
	maxPhysicalZeta = 0.9  // a damping ratio above this is not a body mode
	// eraStepsPerCycle: the ERA time step is chosen so the band's upper edge
	// is sampled about this often per cycle; finer steps put every pole near
	// z = 1 and make the Hankel matrix ill-conditioned.
	eraStepsPerCycle = 10
	// eraMaxRows bounds the rows of the Hankel matrix (block rows times
	// channels): enough to average noise, small enough to keep the SVD cheap.
	eraMaxRows = 120
)

// StabilisationPoint is one physical ERA pole at one model order.
type StabilisationPoint struct {
	Order              int
	NaturalFrequencyHz float64
	DampingRatio       float64
	// Stable is true when the previous order has a pole within the
	// stabilisation tolerances (frequency, damping and MAC).
	Stable bool
	pole   complex128
	shape  []complex128
}

// eraSetup is the geometry of the generalised Hankel matrix: block row i
// holds the samples at lag i*step, and the shifted matrix is one step later.
type eraSetup struct {
	step, blockRows, cols int
}

// newERASetup chooses the step from the decimated rate, the block rows so
// that the rows span about a third of the window (bounded by eraMaxRows),
// and the columns to use every remaining sample.
func newERASetup(nSamples, nch int, dtS, bandHighHz float64, maxOrder int) (eraSetup, bool) {
	step := max(1, int(math.Round(1/(eraStepsPerCycle*bandHighHz*dtS))))
	br := min(nSamples/(3*step), eraMaxRows/nch)
	br = max(br, maxOrder/nch+1)
	cols := nSamples - br*step
	if cols < maxOrder+1 || br*nch < maxOrder+1 {
		return eraSetup{}, false
	}
	return eraSetup{step: step, blockRows: br, cols: cols}, true
}

// eraSweep runs the eigensystem realization algorithm on the free response
// y[c][k] (sampled every dtS) for orders 2, 4, ..., maxOrder and returns the
// physical poles of each order (Im > 0, stable, damping ratio below
// maxPhysicalZeta, natural frequency in [loHz, hiHz]) with their shapes at
// the sensors, each marked stable against the previous order.
//
// With H0[i*nch+c][j] = y[c][i*step+j] and H1 the same one step later,
// H0 = U S V^T (SVD), and for order n
//
//	A_n = S_n^-1/2 U_n^T H1 V_n S_n^-1/2,  C_n = (first nch rows of U_n S_n^1/2)
//
// whose eigenvalues mu give the continuous poles lambda = ln(mu)/(step dt)
// and whose eigenvectors phi give the shapes C_n phi.
//
// References: J.-N. Juang and R. S. Pappa, "An eigensystem realization
// algorithm for modal parameter identification and model reduction",
// Journal of Guidance, Control, and Dynamics 8(5):620-627, 1985,
// doi:10.2514/3.20031 (the generalised Hankel matrix with arbitrary row
// lags, used here with a uniform lag step).
func eraSweep(y [][]float64, dtS float64, es eraSetup, maxOrder int, loHz, hiHz float64) ([]StabilisationPoint, error) {
	nch := len(y)
	rows := es.blockRows * nch
	h0 := mat.NewDense(rows, es.cols, nil)
	h1 := mat.NewDense(rows, es.cols, nil)
	for i := 0; i < es.blockRows; i++ {
		for c := range y {
			for j := 0; j < es.cols; j++ {
				h0.Set(i*nch+c, j, y[c][i*es.step+j])
				h1.Set(i*nch+c, j, y[c][(i+1)*es.step+j])
			}
		}
	}
	var svd mat.SVD
	if !svd.Factorize(h0, mat.SVDThin) {
		return nil, errNumerical("the SVD of the Hankel matrix did not converge")
	}
	var u, v mat.Dense
	svd.UTo(&u)
	svd.VTo(&v)
	s := svd.Values(nil)
	uN := u.Slice(0, rows, 0, maxOrder)
	vN := v.Slice(0, es.cols, 0, maxOrder)
	var t1, core mat.Dense
	t1.Mul(uN.T(), h1)
	core.Mul(&t1, vN) // U^T H1 V for the largest order; smaller orders take its leading block
	var pts []StabilisationPoint
	var prev []StabilisationPoint
	for n := 2; n <= maxOrder; n += 2 {
		if s[n-1] <= 0 {
			break
		}
		a := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				a.Set(i, j, core.At(i, j)/math.Sqrt(s[i]*s[j]))
			}
		}
		var eig mat.Eigen
		if !eig.Factorize(a, mat.EigenRight) {
			continue
		}
		mu := eig.Values(nil)
		var vec mat.CDense
		eig.VectorsTo(&vec)
		var cur []StabilisationPoint
		for k, m := range mu {
			lam := cmplx.Log(m) / complex(float64(es.step)*dtS, 0)
			w := cmplx.Abs(lam)
			fn, zeta := w/(2*math.Pi), -real(lam)/w
			if imag(lam) <= 0 || !(zeta > 0) || zeta > maxPhysicalZeta || fn < loHz || fn > hiHz {
				continue
			}
			shape := make([]complex128, nch)
			for c := range shape {
				for i := 0; i < n; i++ {
					shape[c] += complex(u.At(c, i)*math.Sqrt(s[i]), 0) * vec.At(i, k)
				}
			}
			p := StabilisationPoint{Order: n, NaturalFrequencyHz: fn, DampingRatio: zeta, pole: lam, shape: shape}
			for _, q := range prev {
				if math.Abs(q.NaturalFrequencyHz-fn) < stableFreqTol*fn &&
					math.Abs(q.DampingRatio-zeta) < stableDampTol*zeta &&
					body.MAC(q.shape, shape) > stableMACMin {
					p.Stable = true
					break
				}
			}
			cur = append(cur, p)
		}
		pts = append(pts, cur...)
		prev = cur
	}
	return pts, nil
}

// poleGroup is a set of physical poles, one per order at most, that belong
// to one mode.
type poleGroup struct{ members []StabilisationPoint }

// groupPoles groups physical poles by frequency and damping
// (clusterFreqTol, clusterDampTol against the group's first member, in order
// of increasing model order, one member per order), and sorts the groups by
// the number of orders at which they are stable, then by the number of
// orders at which they appear, most first.
func groupPoles(pts []StabilisationPoint) []poleGroup {
	var gs []poleGroup
	for _, p := range pts {
		placed := false
		for g := range gs {
			f := gs[g].members[0]
			if math.Abs(f.NaturalFrequencyHz-p.NaturalFrequencyHz) < clusterFreqTol*f.NaturalFrequencyHz &&
				math.Abs(f.DampingRatio-p.DampingRatio) < clusterDampTol && !gs[g].hasOrder(p.Order) {
				gs[g].members = append(gs[g].members, p)
				placed = true
				break
			}
		}
		if !placed {
			gs = append(gs, poleGroup{members: []StabilisationPoint{p}})
		}
	}
	sort.SliceStable(gs, func(i, j int) bool {
		si, sj := gs[i].stableCount(), gs[j].stableCount()
		if si != sj {
			return si > sj
		}
		return len(gs[i].members) > len(gs[j].members)
	})
	return gs
}

// stableCount is the number of orders at which the group is stable.
func (g poleGroup) stableCount() int {
	n := 0
	for _, p := range g.members {
		if p.Stable {
			n++
		}
	}
	return n
}

// representative returns the stable member (any member when none is
// stable) with the median natural frequency.
func (g poleGroup) representative() StabilisationPoint {
	var m []StabilisationPoint
	for _, p := range g.members {
		if p.Stable || g.stableCount() == 0 {
			m = append(m, p)
		}
	}
	sort.Slice(m, func(i, j int) bool { return m[i].NaturalFrequencyHz < m[j].NaturalFrequencyHz })
	return m[len(m)/2]
}

// lowestOrder is the lowest order at which the group is stable (at which it
// appears, when it is never stable).
func (g poleGroup) lowestOrder() int {
	o := math.MaxInt
	for _, p := range g.members {
		if p.Stable || g.stableCount() == 0 {
			o = min(o, p.Order)
		}
	}
	return o
}

func (g poleGroup) hasOrder(n int) bool {
	for _, p := range g.members {
		if p.Order == n {
			return true
		}
	}
	return false
}
