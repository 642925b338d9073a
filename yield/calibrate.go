package yield

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// ErrCalibration marks measurements the calibration cannot use.
var ErrCalibration = errors.New("cannot calibrate")

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
	out.Line.Note = fmt.Sprintf("calibrated on %d measured %s (%d %s); ranges are posterior mean ± √3·SD", len(ms), plural(len(ms), "batch", "batches"), nObs, plural(nObs, "value", "values"))
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

func clamp01(x float64) float64 { return math.Min(1, math.Max(0, x)) }

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
