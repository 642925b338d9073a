package yield

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"baleassay/assess"
)

// ErrCalibration marks measurements the calibration cannot use.
var ErrCalibration = errors.New("yield: cannot calibrate")

// Measurement is one measured batch prepared for calibration: its
// composition and what was weighed of it.
type Measurement struct {
	// Composition is the batch's composition, kg by catalogue index (the
	// sum of its bales' ratio estimates, BatchPrediction.Composition).
	Composition []float64
	// Observe and Values are the line quantities measured (flake, dry
	// flake, moisture, streams) and their values.
	Observe []Observable
	Values  []float64
	// AuditCov is the covariance of the predicted quantities that the
	// audits' sampling error alone gives (BatchPrediction.AuditCov).
	AuditCov [][]float64
	// ShareVar is the audits' sampling variance of each category's share
	// of the batch (BatchPrediction.ShareVar); nil leaves the composition
	// as audited.
	ShareVar []float64
}

// CalibrateOptions give the measurement error of the plant's figures.
type CalibrateOptions struct {
	// ScaleRelSD is the relative standard deviation of a weighing; 0
	// means DefaultScaleRelSD.
	ScaleRelSD float64
	// ScaleAbsKg is its absolute floor in kg; 0 means DefaultScaleAbsKg.
	ScaleAbsKg float64
	// MoistureSD is the standard deviation of a moisture reading in
	// percentage points; 0 means DefaultMoistureSD.
	MoistureSD float64
	// HydroxylSD and AcidSD are the standard deviations of the
	// laboratory's hydroxyl and acid values, mg KOH/g (0: not stated).
	// They do not calibrate the line; they widen the coverage check of
	// those quantities (Agreement.InsideWithError).
	HydroxylSD, AcidSD float64
}

// MeasureSD is the standard deviation of a measured value y of a
// quantity: a weighing's √((ScaleRelSD·y)² + ScaleAbsKg²), a moisture
// reading's MoistureSD, the laboratory's stated SDs (defaults applied).
func (o CalibrateOptions) MeasureSD(q Observable, y float64) float64 {
	o = o.WithDefaults()
	switch q.Kind {
	case ObsMoisturePct:
		return o.MoistureSD
	case ObsHydroxylValue:
		return o.HydroxylSD
	case ObsAcidValue:
		return o.AcidSD
	}
	return math.Hypot(o.ScaleRelSD*y, o.ScaleAbsKg)
}

// Default measurement errors: a weighing good to half a per cent with a
// 1 kg floor, a moisture reading good to 0.1 percentage point. Both from
// memory for industrial platform scales and oven-dry moisture; give your
// own scales' figures.
const (
	DefaultScaleRelSD = 0.005
	DefaultScaleAbsKg = 1.0
	DefaultMoistureSD = 0.1
)

// ParamEstimate is one share of the line before and after calibration.
type ParamEstimate struct {
	Ref   ParamRef
	Prior Param
	// PriorMean and PriorSD are the uniform prior's mean and standard
	// deviation, (lo + hi)/2 and (hi − lo)/√12.
	PriorMean, PriorSD float64
	// Mean and SD are the posterior's.
	Mean, SD float64
	// Proposed is the range written into the proposed profile.
	Proposed Param
	// Informed is 1 − SD/PriorSD: 0 when the measurements say nothing
	// about this share, towards 1 when they pin it down.
	Informed float64
}

// Correlation is a pair of shares the measurements tell apart only
// together.
type Correlation struct {
	A, B ParamRef
	Rho  float64
}

// LineCalibration is the outcome of Calibrate.
type LineCalibration struct {
	// Line is the proposed profile: the input with every calibrated
	// share's range replaced (same name; save it as a new version).
	Line   Line
	Params []ParamEstimate
	// Observations is the number of measured values used; ChiSqPrior and
	// ChiSqPost the weighted sums of squared residuals Σ rᵀC⁻¹r at the
	// prior means and at the posterior means. ChiSqPost/Observations well
	// above 1 says the model, or the stated measurement error, is off.
	Observations          int
	ChiSqPrior, ChiSqPost float64
	Iterations            int
	Converged             bool
	Correlated            []Correlation
	// PETYield is the share of the PET fed that leaves in the flake
	// (dust included), the joint effect of every PET loss, before and
	// after: the figure a flake weighing pins down even where it cannot
	// say which stage loses the PET.
	PETYield PETYield
	// Shrunk says the audited compositions were replaced by their
	// expected values given the audits (regression calibration; see
	// Calibrate).
	Shrunk      bool
	ProposalErr error // the proposed ranges do not compile (rare: shares of one stage summing above 1)
	Method      string
}

// CalibrationMethod says how Calibrate works, for reports.
const CalibrationMethod = "Gaussian prior from each ranged share (uniform range → same mean and SD), Gauss–Newton maximum a posteriori fit of the line model to the measured flake, moisture and reject streams, posterior covariance from the linearised model (Tarantola 2005, ch. 3; Rodgers 2000, ch. 5); proposed range = mean ± √3·SD"

// Calibrate proposes new ranges for a line's uncertain shares from
// measured batches. Each share given as a range [lo, hi] gets a Gaussian
// prior of the same mean and standard deviation as the uniform the Monte
// Carlo draws from:
//
//	μ₀ = (lo + hi)/2,   σ₀ = (hi − lo)/√12
//
// (shares given as one number are held fixed). The measured values y_i
// of batch i are modelled as y_i = g_i(θ) + ε_i, g_i the line model at
// shares θ on the batch's composition, ε_i ~ N(0, C_i) with C_i the
// audits' sampling covariance of the prediction plus the measurement
// error (diagonal: (ScaleRelSD·y)² + ScaleAbsKg² for masses, MoistureSD²
// for moisture). The posterior mode minimises
//
//	Φ(θ) = ½ Σ_i (y_i − g_i(θ))ᵀ C_i⁻¹ (y_i − g_i(θ)) + ½ Σ_j ((θ_j − μ₀_j)/σ₀_j)²
//
// found by Gauss–Newton with step halving, J the Jacobian of g by
// central differences:
//
//	A = Jᵀ C⁻¹ J + P⁻¹,   θ ← θ + A⁻¹ (Jᵀ C⁻¹ r − P⁻¹(θ − μ₀))
//
// and the posterior covariance is A⁻¹ at the mode: the least-squares
// solution with a Gaussian prior of Tarantola, Inverse Problem Theory
// and Methods for Model Parameter Estimation, SIAM 2005, ch. 3
// (quasi-Newton iteration), the "optimal estimation" of Rodgers, Inverse
// Methods for Atmospheric Sounding, World Scientific 2000, ch. 5. Each
// proposed range is the uniform of the posterior's mean and SD, μ ± √3σ,
// clipped to [0, 1]; posterior correlations between shares are not
// carried into the profile (it has no place for them) and are listed
// instead.
//
// The audits' error in a batch's composition is measurement error in
// the model's input: fitted as it stands, it pulls the removal shares of
// minor contaminants towards 0 and pushes the PET losses up (attenuation;
// Carroll, Ruppert, Stefanski & Crainiceanu, Measurement Error in
// Nonlinear Models, 2nd ed., Chapman & Hall 2006, ch. 3). With at least
// MinShrinkBatches batches that carry their share variances, each
// batch's audited composition is first replaced by its expected value
// given the audit (regression calibration, ibid. ch. 4): per non-PET
// category c, with ŝ_ic the audited share of batch i, v_ic its sampling
// variance, s̄_c the mean over the batches and V_c = max(0, var_i ŝ_ic −
// mean_i v_ic) the spread of the true shares,
//
//	s̃_ic = s̄_c + λ_ic·(ŝ_ic − s̄_c),   λ_ic = V_c / (V_c + v_ic)
//
// and the target-PET categories take up the difference in proportion,
// so the shares still sum to 1. The audit covariance of the prediction
// is kept as it is, which errs towards wider posteriors.
//
// What the measurements can tell apart depends on what was weighed: the
// flake alone pins down the line's overall PET loss, not which stage
// loses it; weighed reject streams and batches of differing composition
// separate the stages. Informed says per share how much was learnt.
func Calibrate(l Line, ms []Measurement, opt CalibrateOptions) (LineCalibration, error) {
	if _, err := Compile(l); err != nil {
		return LineCalibration{}, err
	}
	opt = opt.WithDefaults()
	if err := opt.check(); err != nil {
		return LineCalibration{}, err
	}
	if len(ms) == 0 {
		return LineCalibration{}, fieldErr("calibration", "batches", ErrCalibration, "no measured batches")
	}
	f := fit{line: l}
	for _, p := range LineParams(l) {
		v, _ := p.Get(l)
		if v.Varies() {
			f.refs = append(f.refs, p)
			f.prior = append(f.prior, v)
		}
	}
	if len(f.refs) == 0 {
		return LineCalibration{}, fieldErr("calibration", "line", ErrCalibration, "line %q gives every share as one number: give the uncertain ones as ranges [low, high] so the measurements can move them", l.Name)
	}
	n := len(f.refs)
	f.mu0, f.sd0 = make([]float64, n), make([]float64, n)
	for j, p := range f.prior {
		f.mu0[j], f.sd0[j] = p.Mid(), (p.Hi-p.Lo)/math.Sqrt(12)
	}
	nObs := 0
	for i, m := range ms {
		c, err := m.noise(i, opt)
		if err != nil {
			return LineCalibration{}, err
		}
		f.ms, f.chol = append(f.ms, m), append(f.chol, c)
		nObs += len(m.Values)
	}
	shrunk := shrinkCompositions(f.ms)
	theta := append([]float64(nil), f.mu0...)
	cur, err := f.state(theta, true)
	if err != nil {
		return LineCalibration{}, fmt.Errorf("%w: the line does not run at its midpoints: %w", ErrCalibration, err)
	}
	out := LineCalibration{Observations: nObs, ChiSqPrior: cur.chi2, Method: CalibrationMethod, Shrunk: shrunk}
	const maxIter = 50
	for out.Iterations = 1; out.Iterations <= maxIter; out.Iterations++ {
		delta, err := f.step(theta, cur)
		if err != nil {
			return LineCalibration{}, err
		}
		accepted, big := false, 0.0
		for t := 1.0; t > 1e-9; t /= 2 {
			next := make([]float64, n)
			for j := range next {
				next[j] = theta[j] + t*delta[j]
			}
			st, err := f.state(next, false)
			if err != nil || st.phi > cur.phi*(1+1e-12)+1e-12 {
				continue
			}
			for j := range next {
				big = math.Max(big, math.Abs(t*delta[j])/f.sd0[j])
			}
			theta, accepted = next, true
			if cur, err = f.state(theta, true); err != nil {
				return LineCalibration{}, err
			}
			break
		}
		if !accepted || big < 1e-7 {
			out.Converged = true
			break
		}
	}
	out.ChiSqPost = cur.chi2
	cov, err := f.posterior(cur)
	if err != nil {
		return LineCalibration{}, err
	}
	out.Line = CloneLine(l)
	out.Line.Note = fmt.Sprintf("calibrated on %d measured %s (%d values); ranges are posterior mean ± √3·SD", len(ms), plural(len(ms), "batch", "batches"), nObs)
	if l.Note != "" {
		out.Line.Note = l.Note + "; " + out.Line.Note
	}
	for j, ref := range f.refs {
		sd := math.Sqrt(math.Max(0, cov.At(j, j)))
		lo, hi := clamp01(theta[j]-math.Sqrt(3)*sd), clamp01(theta[j]+math.Sqrt(3)*sd)
		if ref.Field == "moisture" {
			hi = math.Min(hi, 0.5)
		}
		pe := ParamEstimate{Ref: ref, Prior: f.prior[j], PriorMean: f.mu0[j], PriorSD: f.sd0[j], Mean: theta[j], SD: sd,
			Proposed: Range(lo, hi), Informed: 1 - sd/f.sd0[j]}
		out.Params = append(out.Params, pe)
		ref.Set(&out.Line, pe.Proposed)
		for k := range j {
			rho := cov.At(j, k) / math.Sqrt(cov.At(j, j)*cov.At(k, k))
			if math.Abs(rho) >= 0.8 {
				out.Correlated = append(out.Correlated, Correlation{A: f.refs[k], B: ref, Rho: rho})
			}
		}
	}
	if _, err := Compile(out.Line); err != nil {
		out.ProposalErr = err
	}
	prior := mat.NewSymDense(n, nil)
	for j := range n {
		prior.SetSym(j, j, f.sd0[j]*f.sd0[j])
	}
	if out.PETYield.PriorMean, out.PETYield.PriorSD, err = f.petYield(f.mu0, prior); err != nil {
		return LineCalibration{}, err
	}
	if out.PETYield.Mean, out.PETYield.SD, err = f.petYield(theta, cov); err != nil {
		return LineCalibration{}, err
	}
	return out, nil
}

// PETYield is the line's PET yield (flake PET out / PET in) with its
// standard deviation, before (prior) and after calibration.
type PETYield struct {
	PriorMean, PriorSD, Mean, SD float64
}

// petYield is the PET yield at theta and its SD by the delta method,
// √(∇ᵀ Σ ∇), ∇ by central differences (Casella & Berger, Statistical
// Inference, 2nd ed. 2002, §5.5.4).
func (f *fit) petYield(theta []float64, cov mat.Symmetric) (mean, sd float64, err error) {
	y := func(th []float64) (float64, error) {
		l := CloneLine(f.line)
		for j, ref := range f.refs {
			ref.Set(&l, Fixed(th[j]))
		}
		m, err := Compile(l)
		if err != nil {
			return 0, err
		}
		in := make([]float64, assess.NumCategories())
		pc, _ := assess.CategoryIndex("pet_clear")
		in[pc] = 1000
		bal, err := m.Run(in)
		if err != nil {
			return 0, err
		}
		return bal.PETKg / 1000, nil
	}
	if mean, err = y(theta); err != nil {
		return 0, 0, fmt.Errorf("%w: %w", ErrCalibration, err)
	}
	n := len(theta)
	grad := mat.NewVecDense(n, nil)
	const h = 1e-6
	for j := range n {
		up, down := append([]float64(nil), theta...), append([]float64(nil), theta...)
		up[j] += h
		down[j] -= h
		yu, errU := y(up)
		yd, errD := y(down)
		switch {
		case errU == nil && errD == nil:
			grad.SetVec(j, (yu-yd)/(2*h))
		case errU == nil:
			grad.SetVec(j, (yu-mean)/h)
		case errD == nil:
			grad.SetVec(j, (mean-yd)/h)
		}
	}
	var sg mat.VecDense
	sg.MulVec(cov, grad)
	return mean, math.Sqrt(math.Max(0, mat.Dot(grad, &sg))), nil
}

// MinShrinkBatches is the fewest batches whose compositions' spread is
// estimated for regression calibration.
const MinShrinkBatches = 8

// shrinkCompositions applies regression calibration to the batches'
// compositions in place (see Calibrate) and reports whether it did.
func shrinkCompositions(ms []Measurement) bool {
	if len(ms) < MinShrinkBatches {
		return false
	}
	nc := assess.NumCategories()
	for _, m := range ms {
		if len(m.ShareVar) != nc {
			return false
		}
	}
	mass := make([]float64, len(ms))
	shares := make([][]float64, len(ms))
	for i, m := range ms {
		for _, v := range m.Composition {
			mass[i] += v
		}
		if !(mass[i] > 0) {
			return false
		}
		shares[i] = make([]float64, nc)
		for c, v := range m.Composition {
			shares[i][c] = v / mass[i]
		}
	}
	n := float64(len(ms))
	for c := range nc {
		if isPETComp[c] {
			continue
		}
		col := make([]float64, len(ms))
		errVar := 0.0
		for i := range ms {
			col[i] = shares[i][c]
			errVar += ms[i].ShareVar[c] / n
		}
		mean, sd := meanSD(col)
		spread := math.Max(0, sd*sd-errVar)
		for i := range ms {
			lambda := 0.0
			if spread > 0 {
				lambda = spread / (spread + ms[i].ShareVar[c])
			}
			shares[i][c] = mean + lambda*(col[i]-mean)
		}
	}
	for i := range ms {
		other, pet := 0.0, 0.0
		for c, v := range shares[i] {
			if isPETComp[c] {
				pet += v
			} else {
				other += v
			}
		}
		k := 1.0
		if pet > 0 {
			k = math.Max(0, 1-other) / pet
		}
		comp := make([]float64, nc)
		for c, v := range shares[i] {
			if isPETComp[c] {
				v *= k
			}
			comp[c] = v * mass[i]
		}
		ms[i].Composition = comp
	}
	return true
}

func clamp01(x float64) float64 { return math.Min(1, math.Max(0, x)) }

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// WithDefaults fills the zero measurement errors with the defaults.
func (o CalibrateOptions) WithDefaults() CalibrateOptions {
	if o.ScaleRelSD == 0 {
		o.ScaleRelSD = DefaultScaleRelSD
	}
	if o.ScaleAbsKg == 0 {
		o.ScaleAbsKg = DefaultScaleAbsKg
	}
	if o.MoistureSD == 0 {
		o.MoistureSD = DefaultMoistureSD
	}
	return o
}

func (o CalibrateOptions) check() error {
	for _, c := range []struct {
		field string
		v     float64
	}{{"scale_rel_sd", o.ScaleRelSD}, {"scale_abs_kg", o.ScaleAbsKg}, {"moisture_sd", o.MoistureSD}} {
		if err := checkPositive("calibration", c.field, c.v); err != nil {
			return err
		}
	}
	for _, c := range []struct {
		field string
		v     float64
	}{{"hydroxyl_sd", o.HydroxylSD}, {"acid_sd", o.AcidSD}} {
		if err := checkNonNegative("calibration", c.field, c.v); err != nil {
			return err
		}
	}
	if o.ScaleRelSD > 0.5 {
		return fieldErr("calibration", "scale_rel_sd", ErrOutOfRange, "%g: give the relative error as a fraction (0.005 for half a per cent)", o.ScaleRelSD)
	}
	return nil
}

// noise checks one measurement and factorises its error covariance.
func (m Measurement) noise(i int, opt CalibrateOptions) (*mat.Cholesky, error) {
	where := fmt.Sprintf("batch %d", i+1)
	k := len(m.Observe)
	if len(m.Composition) != assess.NumCategories() {
		return nil, fieldErr(where, "composition", ErrCalibration, "%d shares for %d categories", len(m.Composition), assess.NumCategories())
	}
	if k == 0 || len(m.Values) != k || len(m.AuditCov) != k {
		return nil, fieldErr(where, "values", ErrCalibration, "%d quantities, %d values, %d covariance rows", k, len(m.Values), len(m.AuditCov))
	}
	c := mat.NewSymDense(k, nil)
	for a, o := range m.Observe {
		switch o.Kind {
		case ObsFlakeKg, ObsFlakeDryKg, ObsMoisturePct, ObsStreamKg:
		default:
			return nil, fieldErr(where, o.String(), ErrCalibration, "only line quantities (flake, moisture, streams) calibrate a line")
		}
		y := m.Values[a]
		if !finite(y) || y < 0 {
			return nil, fieldErr(where, o.String(), ErrBadNumber, "%v: give a measured value, 0 or above", y)
		}
		if len(m.AuditCov[a]) != k {
			return nil, fieldErr(where, "audit_cov", ErrCalibration, "row %d has %d entries, want %d", a, len(m.AuditCov[a]), k)
		}
		for b := a; b < k; b++ {
			v := m.AuditCov[a][b]
			if !finite(v) {
				return nil, fieldErr(where, "audit_cov", ErrBadNumber, "not a number")
			}
			c.SetSym(a, b, v)
		}
		sd := opt.MeasureSD(o, y)
		c.SetSym(a, a, math.Max(0, c.At(a, a))+sd*sd)
	}
	var ch mat.Cholesky
	if !ch.Factorize(c) {
		return nil, fieldErr(where, "audit_cov", ErrCalibration, "the error covariance is not positive definite")
	}
	return &ch, nil
}

// fit holds the calibration problem.
type fit struct {
	line     Line
	refs     []ParamRef
	prior    []Param
	mu0, sd0 []float64
	ms       []Measurement
	chol     []*mat.Cholesky
}

// fitState is the model at one θ: residuals (and, when asked, the
// Jacobian) per batch, the data term χ² and the objective Φ.
type fitState struct {
	r    [][]float64
	jac  []*mat.Dense
	chi2 float64
	phi  float64
}

// predict runs the line with the calibrated shares fixed at theta on
// every batch.
func (f *fit) predict(theta []float64) ([][]float64, error) {
	l := CloneLine(f.line)
	for j, ref := range f.refs {
		ref.Set(&l, Fixed(theta[j]))
	}
	m, err := Compile(l)
	if err != nil {
		return nil, err
	}
	out := make([][]float64, len(f.ms))
	for i, ms := range f.ms {
		bal, err := m.Run(ms.Composition)
		if err != nil {
			return nil, err
		}
		y := make([]float64, len(ms.Observe))
		for a, o := range ms.Observe {
			switch o.Kind {
			case ObsFlakeKg:
				y[a] = bal.FlakeKg
			case ObsFlakeDryKg:
				y[a] = bal.FlakeDryKg
			case ObsMoisturePct:
				if bal.FlakeKg > 0 {
					y[a] = 100 * bal.MoistureKg / bal.FlakeKg
				}
			case ObsStreamKg:
				y[a] = bal.StreamKg(o.Stream)
			}
		}
		out[i] = y
	}
	return out, nil
}

func (f *fit) state(theta []float64, withJac bool) (fitState, error) {
	pred, err := f.predict(theta)
	if err != nil {
		return fitState{}, err
	}
	st := fitState{r: make([][]float64, len(f.ms))}
	for i, ms := range f.ms {
		r := make([]float64, len(ms.Values))
		for a := range r {
			r[a] = ms.Values[a] - pred[i][a]
		}
		st.r[i] = r
		st.chi2 += quadForm(f.chol[i], r)
	}
	st.phi = st.chi2 / 2
	for j := range theta {
		z := (theta[j] - f.mu0[j]) / f.sd0[j]
		st.phi += z * z / 2
	}
	if !withJac {
		return st, nil
	}
	st.jac = make([]*mat.Dense, len(f.ms))
	for i, ms := range f.ms {
		st.jac[i] = mat.NewDense(len(ms.Values), len(theta), nil)
	}
	const h = 1e-6
	for j := range theta {
		up, down := append([]float64(nil), theta...), append([]float64(nil), theta...)
		up[j] += h
		down[j] -= h
		pu, errU := f.predict(up)
		pd, errD := f.predict(down)
		var span float64
		switch {
		case errU == nil && errD == nil:
			span = 2 * h
		case errU == nil:
			pd, span = pred, h
		case errD == nil:
			pu, span = pred, h
		default:
			return fitState{}, fmt.Errorf("%w: the line does not run near %s = %g: %w", ErrCalibration, f.refs[j], theta[j], errU)
		}
		for i := range f.ms {
			for a := range pu[i] {
				st.jac[i].Set(a, j, (pu[i][a]-pd[i][a])/span)
			}
		}
	}
	return st, nil
}

// quadForm is rᵀ C⁻¹ r for C given by its Cholesky factor.
func quadForm(c *mat.Cholesky, r []float64) float64 {
	var x mat.VecDense
	rv := mat.NewVecDense(len(r), append([]float64(nil), r...))
	if err := c.SolveVecTo(&x, rv); err != nil {
		return math.Inf(1)
	}
	return mat.Dot(rv, &x)
}

// normal returns A = Jᵀ C⁻¹ J + P⁻¹ and b = Jᵀ C⁻¹ r − P⁻¹(θ − μ₀).
func (f *fit) normal(theta []float64, st fitState) (*mat.SymDense, *mat.VecDense, error) {
	n := len(theta)
	a := mat.NewDense(n, n, nil)
	b := mat.NewVecDense(n, nil)
	for i := range f.ms {
		var cj mat.Dense
		if err := f.chol[i].SolveTo(&cj, st.jac[i]); err != nil {
			return nil, nil, fmt.Errorf("%w: %w", ErrCalibration, err)
		}
		var jt mat.Dense
		jt.Mul(st.jac[i].T(), &cj)
		a.Add(a, &jt)
		var jr mat.VecDense
		jr.MulVec(cj.T(), mat.NewVecDense(len(st.r[i]), st.r[i]))
		b.AddVec(b, &jr)
	}
	sym := mat.NewSymDense(n, nil)
	for j := range n {
		for k := j; k < n; k++ {
			sym.SetSym(j, k, (a.At(j, k)+a.At(k, j))/2)
		}
		sym.SetSym(j, j, sym.At(j, j)+1/(f.sd0[j]*f.sd0[j]))
		b.SetVec(j, b.AtVec(j)-(theta[j]-f.mu0[j])/(f.sd0[j]*f.sd0[j]))
	}
	return sym, b, nil
}

func (f *fit) step(theta []float64, st fitState) ([]float64, error) {
	a, b, err := f.normal(theta, st)
	if err != nil {
		return nil, err
	}
	var ch mat.Cholesky
	if !ch.Factorize(a) {
		return nil, fmt.Errorf("%w: the normal equations are singular", ErrCalibration)
	}
	var d mat.VecDense
	if err := ch.SolveVecTo(&d, b); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrCalibration, err)
	}
	return d.RawVector().Data, nil
}

func (f *fit) posterior(st fitState) (*mat.SymDense, error) {
	theta := make([]float64, len(f.refs)) // only A is used: b's θ term is irrelevant here
	copy(theta, f.mu0)
	a, _, err := f.normal(theta, st)
	if err != nil {
		return nil, err
	}
	var ch mat.Cholesky
	if !ch.Factorize(a) {
		return nil, fmt.Errorf("%w: the posterior covariance is singular", ErrCalibration)
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrCalibration, err)
	}
	return &cov, nil
}
