package fixedpoint

import (
	"math"

	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/readout"
)

// outSide evaluates the output side of the generalized linear model (docs/method.md section 10):
// the scalar channel of z, with z0 ~ N(0, rhoz), the message p1 = mu1 z0 + sqrt(tau) e
// (e ~ N(0, 1) independent of z0 and w), y = readout(z0, w) and zhat = prox of the loss at
// precision g.
type outSide struct {
	rd   readout.Readout
	ls   loss.Loss
	nz   []noise.Component
	w2   float64 // E[w^2]
	rhoz float64
	// labels: the values of y, and for cell readouts the cuts between them
	levels, cuts []float64
	// train asks for the training observables too, which only the final evaluation needs
	train bool
	// hermE holds exp(-sqrt(hermS) x) at the Gauss-Hermite nodes of the logistic readout
	hermS        float64
	hermE        []float64
	hermX, hermW []float64 // the inner rule for hermS (innerRuleFor)
	hermOK       bool      // every hermE finite and nonzero
	// prev holds the last logisticHermite call's proxes and derivatives at its rule's nodes,
	// for each label: the start of the next call when its parameters are within prevNear
	// (the finite-difference Jacobian, the last Newton steps, the final evaluation)
	prevX         *float64 // the rule's first node: which rule they belong to
	prevG, prevSD float64
	prevZ, prevD  [2][outerMax]float64
}

// prevNear is the relative change of g and sqrt(vp) below which logisticHermite starts each
// prox from the previous call's value at the same node, moved to first order in p and g; its
// error, about zhat” (p dsd/sd)^2/2 <= 1e-6 at 5 standard deviations, is below the prox's
// Halley cut-off (loss.NearTol, about 1e-5), so that one Newton step and the Halley step end
// the iteration.
const prevNear = 1e-3

// outMoments are the output side's answers: the derivative Az = E[d zhat/dp], the truth
// coefficient muz and error variance sigz of the backward message p2 = (zhat - Az p1)/(1 - Az)
// = muz z0 + N(0, sigz), and the training observables at zhat.
type outMoments struct {
	az, muz, sigz           float64
	trainErr, trainLoss     float64 // E[(y - zhat)^2], E[L(y, zhat)]
	misfit                  float64 // P(sign(zhat) != y), labels only
	linearSquare, zeroDeriv bool
}

// linear is the output side of the linear readout with a regression loss, where the channel
// depends on (z0, p1) only through v = y - p1 = (z0 - p1) + w, and with tau = E[(p1 - z0)^2]
// each noise component k gives v ~ N(0, tau + V_k). The backward message then has muz = 1
// whatever the loss, and p2 - z0 = w + (Az v - R(v))/(1 - Az), whose moments on each linear
// piece of the residual prox R are truncated normal moments (closed forms; the posterior
// E[w | v] = V_k v/(tau + V_k) gives the cross terms).
func (o *outSide) linear(g, tau float64) outMoments {
	reg, ok := o.ls.(loss.Regression)
	if !ok {
		return outMoments{az: math.NaN()}
	}
	if o.ls.Name() == "square" {
		// Least squares: p2 = y exactly, so the backward message is z0 + w.
		a := g / (1 + g)
		return outMoments{az: a, muz: 1, sigz: o.w2, trainErr: a * a * (tau + o.w2),
			trainLoss: a * a * (tau + o.w2) / 2, linearSquare: true}
	}
	pieces := reg.Residual(g)
	type comp struct{ w, vk, s2, a, r2 float64 }
	cs := make([]comp, 0, len(o.nz))
	az := 0.0
	for _, k := range o.nz {
		c := comp{w: k.Weight, vk: k.Var, s2: tau + k.Var}
		for _, q := range pieces {
			if c.s2 == 0 {
				if 0 >= q.Lo && 0 < q.Hi {
					c.a += q.Slope
					c.r2 += q.Intercept * q.Intercept
				}
				continue
			}
			m0, m1, m2 := truncMoments(q.Lo, q.Hi, c.s2)
			c.a += q.Slope * m0
			c.r2 += q.Slope*q.Slope*m2 + 2*q.Slope*q.Intercept*m1 + q.Intercept*q.Intercept*m0
		}
		az += c.w * c.a
		cs = append(cs, c)
	}
	out := outMoments{az: az, muz: 1}
	if az >= 1 {
		out.zeroDeriv = true
		return out
	}
	for _, c := range cs {
		d := 0.0
		for _, q := range pieces {
			e := az - q.Slope
			if c.s2 == 0 {
				if 0 >= q.Lo && 0 < q.Hi {
					d += q.Intercept * q.Intercept
				}
				continue
			}
			m0, m1, m2 := truncMoments(q.Lo, q.Hi, c.s2)
			d += e*e*m2 - 2*e*q.Intercept*m1 + q.Intercept*q.Intercept*m0
		}
		out.sigz += c.w * (c.vk + 2*c.vk*(az-c.a)/(1-az) + d/((1-az)*(1-az)))
		out.trainErr += c.w * c.r2
		if o.train {
			out.trainLoss += c.w * o.residualLoss(pieces, c.s2)
		}
	}
	out.sigz = math.Max(out.sigz, 0)
	return out
}

// residualLoss returns E[l(R(v))] for v ~ N(0, s2) by Gauss-Legendre quadrature split at the
// pieces' ends (the loss itself is piecewise smooth there).
func (o *outSide) residualLoss(pieces []loss.Piece, s2 float64) float64 {
	at := func(v float64) float64 {
		q := pieces[len(pieces)-1]
		for _, c := range pieces[:len(pieces)-1] {
			if v < c.Hi {
				q = c
				break
			}
		}
		return o.ls.Value(q.Slope*v+q.Intercept, 0)
	}
	if s2 == 0 {
		return at(0)
	}
	cuts := make([]float64, 0, len(pieces))
	for _, q := range pieces[1:] {
		cuts = append(cuts, q.Lo)
	}
	x, w := gaussGrid(s2, cuts, math.Sqrt(s2), nil)
	sum := 0.0
	for i := range x {
		sum += w[i] * at(x[i])
	}
	return sum
}

// labelProb returns P(y = levels[j] | z0) averaged over z0 ~ N(m, s) (s >= 0), and
// E[z0 1{y = levels[j]}] over the same law, for every j, into py and zy.
func (o *outSide) labelProb(m, s float64, py, zy []float64) {
	if o.rd.Name() == "logistic" {
		// Labels -1, +1 with P(+1 | z) = sigmoid(z): Gauss-Hermite in z0, and Stein's identity
		// E[z0 h(z0)] = m E[h] + s E[h'] for the first moment.
		// sigmoid(m + rs x) = 1/(1 + e^-m e^(-rs x)): the factors e^(-rs x) at the nodes
		// are kept while s stays (one labels call), which leaves one exp per call here.
		p, d := o.logisticProb(m, s)
		py[0], py[1] = 1-p, p
		zy[1] = m*p + s*d
		zy[0] = m*(1-p) - s*d
		return
	}
	// Cells of z0 + w: for the noise component N(0, V), z0 + w ~ N(m, s + V). Each cut's
	// standard normal tail comes from one erfc on its own side, shared by the two cells it
	// bounds, and a cell is a difference of tails on one side only, so that a cell far out
	// keeps its relative accuracy.
	for j := range py {
		py[j], zy[j] = 0, 0
	}
	for _, k := range o.nz {
		sd := math.Sqrt(s + k.Var)
		// lower, upper: P(Z < a), P(Z >= a) at the cell's lower end a; dens: phi(a)/sd.
		loA, loLow, loUp, loDens := math.Inf(-1), 0.0, 1.0, 0.0
		for j := range o.levels {
			var hiA, hiLow, hiUp, hiDens float64
			if j < len(o.cuts) {
				if sd == 0 {
					hiA = math.Copysign(math.Inf(1), o.cuts[j]-m)
					if o.cuts[j] == m {
						hiA = 0
					}
				} else {
					hiA = (o.cuts[j] - m) / sd
				}
				q := math.Erfc(math.Abs(hiA)/math.Sqrt2) / 2
				if hiA < 0 {
					hiLow, hiUp = q, 1-q
				} else {
					hiLow, hiUp = 1-q, q
				}
				if sd > 0 {
					hiDens = normPDF(hiA) / sd
				}
			} else {
				hiA, hiLow, hiUp = math.Inf(1), 1, 0
			}
			var cell float64
			switch {
			case hiA <= 0:
				cell = hiLow - loLow
			case loA >= 0:
				cell = loUp - hiUp
			default:
				cell = 1 - loLow - hiUp
			}
			py[j] += k.Weight * cell
			zy[j] += k.Weight * (m*cell + s*(loDens-hiDens))
			loA, loLow, loUp, loDens = hiA, hiLow, hiUp, hiDens
		}
	}
}

// logisticProb returns P = E[sigmoid(z0)] and D = E[sigmoid'(z0)] over z0 ~ N(m, s) by the
// inner Gauss-Hermite rule for s. sigmoid(m + rs x) = 1/(1 + e^-m e^(-rs x)): the factors
// e^(-rs x) at the nodes are kept while s stays (one labels call), which leaves one exp per
// call here.
func (o *outSide) logisticProb(m, s float64) (p, d float64) {
	if o.hermE == nil || s != o.hermS {
		o.hermS = s
		r := innerRuleFor(s)
		o.hermX, o.hermW = r.x, r.w
		o.hermE = make([]float64, len(r.x))
		o.hermOK = true
		for i, x := range r.x {
			o.hermE[i] = math.Exp(-math.Sqrt(s) * x)
			o.hermOK = o.hermOK && o.hermE[i] > 0 && !math.IsInf(o.hermE[i], 0)
		}
	}
	em := math.Exp(-m)
	// With both factors finite and nonzero their product is safe (an overflow to Inf or
	// an underflow to 0 gives the right 0 or 1); otherwise each node goes through Sigmoid.
	fast := em > 0 && !math.IsInf(em, 0) && o.hermOK
	for i, x := range o.hermX {
		var sg float64
		if fast {
			sg = 1 / (1 + em*o.hermE[i])
		} else {
			sg = readout.Sigmoid(m + math.Sqrt(s)*x)
		}
		p += o.hermW[i] * sg
		d += o.hermW[i] * sg * (1 - sg)
	}
	return p, d
}

// labels is the output side of a readout with finitely many values: for each value y, the
// conditional z0 | p1 ~ N(beta p1, s) gives P(y | p1) and E[z0 1{y} | p1] in closed form
// (cells: normal cell probabilities; logistic: Gauss-Hermite), and the outer expectation over
// p1 ~ N(0, vp) is a Gauss-Legendre quadrature split at the loss prox's kinks and graded
// around the readout's thresholds (where P(y | p1) turns on the scale sqrt(s + V)/beta).
// The backward message follows from delta = (zhat - p1)/(1 - Az):
// muz = mu1 + E[delta z0]/rhoz and sigz = E[delta^2] - tau - (muz - mu1)^2 rhoz (Stein's
// identity gives E[(p1 - mu1 z0) delta] = -tau).
func (o *outSide) labels(g, mu1, tau float64) outMoments {
	vp := mu1*mu1*o.rhoz + tau
	if !(vp > 0) {
		return outMoments{az: math.NaN()}
	}
	if !o.train && o.ls.Name() == "square" && len(o.cuts) > 0 {
		return o.cellsSquare(g)
	}
	beta := mu1 * o.rhoz / vp
	s := o.rhoz * tau / vp
	if !noHermite {
		if hx, hw := o.outerRule(g, vp, beta); hx != nil {
			return o.logisticHermite(g, mu1, tau, vp, beta, s, hx, hw)
		}
	}
	var kinks []float64
	for _, y := range o.levels {
		kinks = append(kinks, o.ls.Kinks(y, g)...)
		if !o.train {
			continue
		}
		if r, ok := o.zeroCrossing(y, g, vp); ok {
			kinks = append(kinks, r)
		}
	}
	var sharp [][2]float64
	if beta != 0 {
		minV := math.Inf(1)
		for _, k := range o.nz {
			minV = math.Min(minV, k.Var)
		}
		if o.rd.Name() == "logistic" {
			sharp = append(sharp, [2]float64{0, math.Sqrt(1+s) / math.Abs(beta)})
		} else {
			sc := math.Sqrt(s+minV) / math.Abs(beta)
			for _, c := range o.cuts {
				sharp = append(sharp, [2]float64{c / beta, sc})
			}
		}
	}
	if o.ls.Name() == "square" && len(o.cuts) > 0 && !noHermite {
		return o.cellsSquareTrain(g, mu1, vp, beta, s, sharp)
	}
	x, w := gaussGrid(vp, kinks, labelsPanel*math.Sqrt(vp), sharp)
	py := make([]float64, len(o.levels))
	zy := make([]float64, len(o.levels))
	var az, dz, dd, dp, terr, tloss, mis float64
	// The nodes increase, and so does zhat: an iterative prox starts from the previous node's.
	near, _ := o.ls.(loss.Near)
	last := make([]float64, len(o.levels))
	for j := range last {
		last[j] = math.NaN()
	}
	for i, p := range x {
		o.labelProb(beta*p, s, py, zy)
		for j, y := range o.levels {
			if py[j] == 0 && zy[j] == 0 {
				continue
			}
			var zh, der float64
			if near != nil {
				zh, der = near.ProxNear(y, p, g, last[j])
				last[j] = zh
			} else {
				zh, der = o.ls.Prox(y, p, g)
			}
			pw := w[i] * py[j]
			az += pw * der
			dz += w[i] * zy[j] * (zh - p)
			dd += pw * (zh - p) * (zh - p)
			dp += pw * (zh - p) * p
			if !o.train {
				continue
			}
			terr += pw * (y - zh) * (y - zh)
			tloss += pw * o.ls.Value(y, zh)
			if (zh >= 0) != (y >= 0) {
				mis += pw
			}
		}
	}
	out := outMoments{az: az, trainErr: terr, trainLoss: tloss, misfit: mis}
	return o.backward(out, az, dz, dd, mu1, tau)
}

// cellsSquare is the output side of a cell readout (sign, quantize) with the square loss
// in closed form. The prox is linear, zhat = (y + g p1)/(1 + g), so Az = g/(1 + g) and the
// backward message is y itself: muz = E[z0 y]/rhoz and sigz = E[y^2] - muz^2 rhoz, whatever
// (mu1, tau). With u = z0 + w ~ N(0, rhoz + V) for each noise component,
// E[z0 1{u in cell}] = rhoz/sd (phi(a) - phi(b)) at the cell's standardized ends a, b.
// The training observables need the joint law of (y, zhat) and keep labels' quadrature.
func (o *outSide) cellsSquare(g float64) outMoments {
	ey2, ezy := o.cellsMoments()
	muz := ezy / o.rhoz
	return outMoments{az: g / (1 + g), muz: muz, sigz: math.Max(ey2-muz*ezy, 0)}
}

// cellsSquareTrain is cellsSquare with the training observables: y - zhat = g (y - p1)/(1 + g)
// and E[y p1] = mu1 E[y z0] (the noise of p1 is independent of z0 and w) give the training
// error and loss in closed form; the misfit P(sign zhat != y), zhat < 0 exactly when
// p1 < -y/g, comes from misfitGrid.
func (o *outSide) cellsSquareTrain(g, mu1, vp, beta, s float64, sharp [][2]float64) outMoments {
	out := o.cellsSquare(g)
	ey2, ezy := o.cellsMoments()
	a := g / (1 + g)
	out.trainErr = a * a * math.Max(ey2-2*mu1*ezy+vp, 0)
	out.trainLoss = out.trainErr / 2
	out.misfit = o.misfitGrid(g, vp, beta, s, sharp)
	return out
}

// cellsMoments returns E[y^2] and E[z0 y] of a cell readout.
func (o *outSide) cellsMoments() (ey2, ezy float64) {
	for _, k := range o.nz {
		sd := math.Sqrt(o.rhoz + k.Var)
		lo, loPDF := math.Inf(-1), 0.0
		for j, y := range o.levels {
			hi, hiPDF := math.Inf(1), 0.0
			if j < len(o.cuts) {
				hi = o.cuts[j] / sd
				hiPDF = normPDF(hi)
			}
			ey2 += k.Weight * y * y * normCell(lo, hi)
			ezy += k.Weight * y * o.rhoz / sd * (loPDF - hiPDF)
			lo, loPDF = hi, hiPDF
		}
	}
	return ey2, ezy
}

// zeroCrossing returns the p1 where zhat(y, p1) changes sign (zhat is nondecreasing in p1),
// found by bisection within +-12 standard deviations, for the misfit's indicator.
func (o *outSide) zeroCrossing(y, g, vp float64) (float64, bool) {
	lo, hi := -12*math.Sqrt(vp), 12*math.Sqrt(vp)
	zl, _ := o.ls.Prox(y, lo, g)
	zh, _ := o.ls.Prox(y, hi, g)
	if zl >= 0 || zh < 0 {
		return 0, false
	}
	for range 80 {
		mid := (lo + hi) / 2
		if z, _ := o.ls.Prox(y, mid, g); z >= 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi, true
}

// testError is the probability that the sign of a fresh row's prediction zh differs from
// that row's label, where (z, zh) is jointly Gaussian with Var z = rhoz, Var zh = q,
// Cov = c. For cell readouts the label's sign is the sign of z + w, and each noise component
// gives arccos(corr)/pi (Sheppard 1899); for the logistic readout it is
// 2 E[sigmoid(-z) P(zh > 0 | z)] by quadrature over z.
func (o *outSide) testError(q, c float64) float64 {
	if !(q > 0) {
		return 0.5
	}
	if o.rd.Name() == "logistic" {
		b := c / o.rhoz
		res := math.Max(q-c*b, 0)
		var sharp [][2]float64
		if res > 0 {
			sharp = [][2]float64{{0, math.Sqrt(res) / math.Max(math.Abs(b), 1e-300)}}
		}
		// The integrand is smooth off 0 and its poles (those of the sigmoid) lie pi from
		// the real axis: 16 nodes on sub-intervals of at most two standard deviations and 3.
		x, w := gaussGrid(o.rhoz, []float64{0}, labelsPanel*math.Min(2*math.Sqrt(o.rhoz), 3), sharp)
		e := 0.0
		for i, z := range x {
			var pos float64
			if res == 0 {
				if b*z > 0 {
					pos = 1
				}
			} else {
				pos = normCell(-b*z/math.Sqrt(res), math.Inf(1))
			}
			e += w[i] * readout.Sigmoid(-z) * pos
		}
		return 2 * e
	}
	e := 0.0
	for _, k := range o.nz {
		r := c / math.Sqrt(q*(o.rhoz+k.Var))
		e += k.Weight * math.Acos(math.Max(-1, math.Min(1, r))) / math.Pi
	}
	return e
}

// trainAtZero returns the training observables of the zero estimate, zhat = 0.
func (o *outSide) trainAtZero() outMoments {
	var om outMoments
	if len(o.levels) == 0 {
		for _, k := range o.nz {
			v := o.rhoz + k.Var
			om.trainErr += k.Weight * v
			if v == 0 {
				om.trainLoss += k.Weight * o.ls.Value(0, 0)
				continue
			}
			x, w := gaussGrid(v, []float64{0}, math.Sqrt(v)/4, nil)
			for i := range x {
				om.trainLoss += k.Weight * w[i] * o.ls.Value(x[i], 0)
			}
		}
		return om
	}
	py := make([]float64, len(o.levels))
	zy := make([]float64, len(o.levels))
	o.labelProb(0, o.rhoz, py, zy)
	for j, y := range o.levels {
		om.trainErr += py[j] * y * y
		om.trainLoss += py[j] * o.ls.Value(y, 0)
		if y < 0 {
			om.misfit += py[j]
		}
	}
	return om
}

// outerRules are the Gauss-Hermite rules of the outer expectation over p1 in logisticHermite
// (gonum quad.Hermite, rescaled to the standard normal), each with the largest standard
// deviation of p1 it serves. The integrand's complex singularities (those of the sigmoid and
// of the logistic prox) lie at a distance of order pi from the real axis in p1 itself, so the
// rule's accuracy falls with the spread sqrt(vp), not with the precision; beyond the last
// rule, or when P(y | p1) turns on less than outerSharp standard deviations of p1, labels
// keeps its graded Gauss-Legendre grid. docs/method.md section 11.3 states the accuracy and
// TestLogisticHermiteAccuracy measures it.
var outerRules = []struct {
	maxSD float64
	x, w  []float64
}{{1.25, nil, nil}, {1.5, nil, nil}, {2.1, nil, nil}, {2.4, nil, nil}}

// outerMax bounds the number of nodes of an outer rule.
const outerMax = 96

func init() {
	for i, n := range [...]int{32, 48, 64, outerMax} {
		x, w := hermiteNormal(n)
		// Nodes of weight below 1e-22 are left out (about a quarter of each rule): the
		// integrands grow at most like p1^2 / g^2, so what they carry is below rounding.
		var kx, kw []float64
		for k := range x {
			if w[k] >= 1e-22 {
				kx, kw = append(kx, x[k]), append(kw, w[k])
			}
		}
		outerRules[i].x, outerRules[i].w = kx, kw
	}
}

// outerRule returns the Gauss-Hermite rule for p1 ~ N(0, vp) and P(y | p1) turning on the
// scale turn, or nil when the graded grid is needed.
func (o *outSide) outerRule(g, vp, beta float64) (x, w []float64) {
	sd := math.Sqrt(vp)
	if !o.smoothLogistic(g) {
		return nil, nil
	}
	// P(y | p1) is the inner rule's sum of sigmoid(beta p1 + c_i), whose poles lie pi/|beta|
	// from the real axis in p1; those of the logistic prox lie about pi from it.
	eff := sd * math.Max(1, math.Abs(beta))
	for _, r := range outerRules {
		if eff <= r.maxSD {
			return r.x, r.w
		}
	}
	return nil, nil
}

// smoothLogistic reports whether the output side is the logistic readout with a loss whose
// prox has no kinks at precision g (logistic, square), for which the integrand over p1 is
// smooth and a Gauss-Hermite rule converges fast.
func (o *outSide) smoothLogistic(g float64) bool {
	if o.rd.Name() != "logistic" {
		return false
	}
	for _, y := range o.levels {
		if len(o.ls.Kinks(y, g)) > 0 {
			return false
		}
	}
	return true
}

// logisticHermite is labels for smoothLogistic: the outer expectation over p1 ~ N(0, vp) by
// a Gauss-Hermite rule of outerRules, with the same inner rule for P(y | p1) and the same
// backward message. The prox at each node starts from the first-order extrapolation of the
// previous node's (the nodes increase and d zhat/dp is known there), which leaves one or two
// Newton steps. The training misfit has an indicator in p1 and is integrated on its own
// (misfitGrid).
func (o *outSide) logisticHermite(g, mu1, tau, vp, beta, s float64, hx, hw []float64) outMoments {
	var py, zy [2]float64
	var az, dz, dd, terr, tloss float64
	near, _ := o.ls.(loss.Near)
	nearTol, _ := o.ls.(loss.NearTol)
	tol := 0.0
	if nearTol != nil {
		tol = nearTol.NearTol(g)
	}
	logLoss := o.ls.Name() == "logistic"
	var lastZ, lastD, lastC, lastP [2]float64
	sd := math.Sqrt(vp)
	// The logistic readout is odd, P(y = -1 | z) = P(y = +1 | -z), and so are these losses'
	// proxes, zhat(-y, -p) = -zhat(y, p) (L(-y, -z) = L(y, z)); p1 ~ N(0, vp) is symmetric, so
	// the label -1's share of every sum below equals the label +1's (p1 -> -p1 maps one onto
	// the other: P, zhat - p1 and E[z0 1{y} | p1] change sign together) and only y = +1 is
	// integrated, twice (docs/method.md section 10.3).
	levels, twice := o.levels, 1.0
	if o.oddLabels() {
		levels, twice = levels[1:], 2
	}
	// P(+1 | p1) at the nodes: on a rule symmetric about 0, P(+1 | -p1) = 1 - P(+1 | p1) and
	// E[sigma'] is even (the inner rule is symmetric too), so the negative half gives the
	// positive one; P is computed where it is below 1/2 when beta > 0, keeping its relative
	// accuracy in the tail and 1 - P there exact to rounding.
	var pr, dr [outerMax]float64
	n := len(hx)
	mirror := n%2 == 0
	for k := 0; k < n/2 && mirror; k++ {
		mirror = hx[k] == -hx[n-1-k]
	}
	for i := range n {
		if mirror && i >= n/2 {
			pr[i], dr[i] = 1-pr[n-1-i], dr[n-1-i]
			continue
		}
		pr[i], dr[i] = o.logisticProb(beta*sd*hx[i], s)
	}
	fromPrev := nearTol != nil && o.prevX == &hx[0] && math.Abs(g-o.prevG) <= prevNear*g && math.Abs(sd-o.prevSD) <= prevNear*sd
	prevG, prevSD := o.prevG, o.prevSD
	o.prevX, o.prevG, o.prevSD = &hx[0], g, sd
	for i, x := range hx {
		p := sd * x
		m := beta * p
		py[0], py[1] = 1-pr[i], pr[i]
		zy[1] = m*pr[i] + s*dr[i]
		zy[0] = m*(1-pr[i]) - s*dr[i]
		for jj, y := range levels {
			j := jj + len(o.levels) - len(levels)
			var zh, der float64
			if fromPrev {
				// d zhat/dg = -(zhat - p) D/g from g (y zhat - y p) = sigma(-y zhat).
				z0, d0, p0 := o.prevZ[j][i], o.prevD[j][i], prevSD*x
				zh, der = nearTol.ProxNearTol(y, p, g, z0+d0*(p-p0)-(z0-p0)*d0/prevG*(g-prevG), tol)
			} else if near != nil && i > 0 {
				h := p - lastP[j]
				if nearTol != nil {
					zh, der = nearTol.ProxNearTol(y, p, g, lastZ[j]+h*(lastD[j]+h*lastC[j]/2), tol)
				} else {
					zh, der = near.ProxNear(y, p, g, lastZ[j]+h*(lastD[j]+h*lastC[j]/2))
				}
			} else {
				zh, der = o.ls.Prox(y, p, g)
			}
			lastZ[j], lastD[j], lastP[j] = zh, der, p
			o.prevZ[j][i], o.prevD[j][i] = zh, der
			if logLoss {
				// d^2 zhat/dp^2 = -y sigma''(s) D^3 / g for the logistic loss (s = y zhat,
				// D = d zhat/dp = g/(g + sigma'(s))), from the values in hand: sigma'(s) =
				// g (1 - D)/D and sigma(-s) = g (s - y p) (docs/method.md section 10.1).
				sp := g * (1 - der) / der
				sm := g * (y*zh - y*p)
				lastC[j] = -y * sp * (2*sm - 1) * der * der * der / g
			}
			pw := hw[i] * py[j]
			az += pw * der
			dz += hw[i] * zy[j] * (zh - p)
			dd += pw * (zh - p) * (zh - p)
			if o.train {
				terr += pw * (y - zh) * (y - zh)
				tloss += pw * o.ls.Value(y, zh)
			}
		}
	}
	az, dz, dd, terr, tloss = twice*az, twice*dz, twice*dd, twice*terr, twice*tloss
	out := outMoments{az: az, trainErr: terr, trainLoss: tloss}
	if o.train {
		var sharp [][2]float64
		if beta != 0 {
			sharp = [][2]float64{{0, math.Sqrt(1+s) / math.Abs(beta)}}
		}
		out.misfit = o.misfitGrid(g, vp, beta, s, sharp)
	}
	return o.backward(out, az, dz, dd, mu1, tau)
}

// oddLabels reports the logistic readout with a loss whose prox is odd, zhat(-y, -p) =
// -zhat(y, p) (logistic, square): the label -1's share of an expectation over the symmetric
// p1 ~ N(0, vp) then equals the label +1's (docs/method.md section 10.3).
func (o *outSide) oddLabels() bool {
	sym := o.ls.Name() == "logistic" || o.ls.Name() == "square"
	return sym && o.rd.Name() == "logistic" && len(o.levels) == 2 && o.levels[0] == -1 && o.levels[1] == 1
}

// misfitGrid returns P(sign zhat != y) = sum_y E[P(y | p1) 1{sign zhat(y, p1) != sign y}] by
// labels' graded Gauss-Legendre grid split at the p1 where each zhat(y, .) changes sign; only
// the nodes on a misfit side need P(y | p1), and no prox is solved there.
func (o *outSide) misfitGrid(g, vp, beta, s float64, sharp [][2]float64) float64 {
	var kinks []float64
	cross := make([]float64, len(o.levels))
	has := make([]bool, len(o.levels))
	// With odd labels only y = +1 is integrated, twice (its misfit side is p1 < cross).
	j0, twice := 0, 1.0
	if o.oddLabels() {
		j0, twice = 1, 2
	}
	for j, y := range o.levels {
		if j < j0 {
			continue
		}
		switch o.ls.Name() {
		case "square": // zhat = (y + g p)/(1 + g)
			cross[j], has[j] = -y/g, true
		case "logistic": // zhat = 0 where g (0 - y p) = sigma(0) = 1/2
			cross[j], has[j] = -y/(2*g), true
		default:
			cross[j], has[j] = o.zeroCrossing(y, g, vp)
		}
		if has[j] {
			kinks = append(kinks, cross[j])
		}
	}
	// The integrand is smooth between the cuts and turns on the sharp scales (graded where
	// less than a standard deviation): 16 nodes on two standard deviations elsewhere.
	top := math.Inf(1)
	if j0 == 1 {
		top = cross[1] // y = +1 is misfit below its crossing only
	}
	x, w := gaussGridTo(vp, kinks, 2*labelsPanel*math.Sqrt(vp), sharp, top)
	py := make([]float64, len(o.levels))
	zy := make([]float64, len(o.levels))
	mis := 0.0
	bad := make([]bool, len(o.levels))
	for i, p := range x {
		// zhat(y, p) >= 0 exactly when p >= cross (zhat is nondecreasing in p); without a
		// crossing its sign is that of zhat at any p.
		any := false
		for j, y := range o.levels {
			if j < j0 {
				continue
			}
			pos := p >= cross[j]
			if !has[j] {
				z, _ := o.ls.Prox(y, p, g)
				pos = z >= 0
			}
			bad[j] = pos != (y >= 0)
			any = any || bad[j]
		}
		if !any {
			continue
		}
		o.labelProb(beta*p, s, py, zy)
		for j := range o.levels {
			if bad[j] {
				mis += w[i] * py[j]
			}
		}
	}
	return twice * mis
}

// noHermite makes labels use its graded grid throughout, and labelsPanel is that grid's
// widest sub-interval in standard deviations of p1: the tests' dense reference sets both.
var (
	noHermite   bool
	labelsPanel = 1.0
)

// backward completes out, the output side's moments with derivative az, with the backward
// message (muz, sigz) from the sums dz and dd over the quadrature (docs/method.md section 10.2);
// az >= 1 (or NaN) leaves no backward message and marks zeroDeriv.
func (o *outSide) backward(out outMoments, az, dz, dd, mu1, tau float64) outMoments {
	if !(az < 1) {
		out.zeroDeriv = true
		return out
	}
	c := 1 - az
	dmu := dz / (c * o.rhoz)
	out.muz = mu1 + dmu
	out.sigz = math.Max(dd/(c*c)-tau-dmu*dmu*o.rhoz, 0)
	return out
}
