package yield

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"baleassay/assess"
)

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
			return fitState{}, fmt.Errorf("%w: the line does not run near %s = %s: %w", ErrCalibration, f.refs[j], assess.Plain(theta[j]), errU)
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
