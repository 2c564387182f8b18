package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/stat"
)

// MonteCarloResult is the outcome of propagating distributions through a
// model (JCGM 101:2008): the estimate of the output, its standard
// uncertainty and 95 % coverage intervals, and, once ValidateGUM has been
// called, how well the GUM uncertainty framework agrees with it.
type MonteCarloResult struct {
	Trials       int     `json:"trials"`               // M, model evaluations used
	Mean         float64 `json:"mean"`                 // y, average of the model values
	U            float64 `json:"standard_uncertainty"` // u(y), their standard deviation
	Coverage     float64 `json:"coverage"`             // p = 0.95
	Low          float64 `json:"low"`                  // probabilistically symmetric interval, low end (JCGM 101 7.7.2)
	High         float64 `json:"high"`                 // probabilistically symmetric interval, high end
	ShortestLow  float64 `json:"shortest_low"`         // shortest interval, low end (JCGM 101 7.7.3)
	ShortestHigh float64 `json:"shortest_high"`        // shortest interval, high end
	GUMValidated bool    `json:"gum_validated"`        // set by ValidateGUM
	DLow         float64 `json:"d_low"`                // |y − U − y_low| of the GUM result, set by ValidateGUM
	DHigh        float64 `json:"d_high"`               // |y + U − y_high|, set by ValidateGUM
	Delta        float64 `json:"delta"`                // numerical tolerance δ, set by ValidateGUM
	Adaptive     bool    `json:"adaptive"`             // M chosen by the adaptive procedure
	Batches      int     `json:"batches,omitempty"`    // h, batches of the adaptive procedure
	Tolerance    float64 `json:"tolerance,omitempty"`  // δ of u(y) at which the adaptive procedure stopped
	Spread       float64 `json:"spread,omitempty"`     // largest of 2s_y, 2s_u, 2s_low, 2s_high at the stop
	Seed         uint64  `json:"seed"`
}

// ErrNotStabilised is returned, wrapped and together with the result so
// far, when MonteCarloAdaptive reaches its cap of trials before the results
// are stable.
var ErrNotStabilised = errors.New("results not stabilised")

// Sizes. The stream of trials is cut into blocks of mcBlock trials,
// block b drawing from its own PCG seeded with (seed, mix(b)), so that trial
// r has the same inputs whatever the number of workers. mcBlock divides
// mcBatch so that the batches of the adaptive procedure are whole blocks of
// the same stream MonteCarlo uses.
const (
	mcBlock     = 2500
	mcCoverage  = 0.95
	mcMinTrials = 2000       // J = ⌈100/(1 − p)⌉ at p = 0.95 (JCGM 101:2008 7.9.4 b)
	mcBatch     = 10000      // max(J, 10⁴) (JCGM 101:2008 7.9.4 b)
	mcMaxTrials = 10_000_000 // 80 MB of model values
)

// MonteCarlo propagates the distributions of the inputs through f with M =
// trials model evaluations (JCGM 101:2008 clause 7) and returns the
// average y of the model values, their standard deviation u(y) (computed
// in two passes by gonum's stat.MeanVariance), and the probabilistically
// symmetric and the shortest 95 % coverage intervals from the sorted values
// (JCGM 101:2008 7.7): with q = ⌊pM + ½⌋ and 1-based order statistics,
//
//	symmetric  [y_(r), y_(r+q)],  r = (M − q)/2, or (M − q + 1)/2 when M − q is odd
//	shortest   [y_(r*), y_(r*+q)], r* minimising y_(r+q) − y_(r), r = 1 … M − q
//
// Each input is drawn from its Distribution with standard deviation U.
// Inputs that corr correlates must be Normal; they are drawn jointly as
// x = μ + D·L·z, z ~ N(0, I), where D = diag(u) and R = L·Lᵀ, so that D·L is
// the Cholesky factor of the covariance D·R·D (JCGM 101:2008 6.4.8). A
// singular R (r = ±1) is accepted.
//
// The trials run on workers goroutines (0 means runtime.NumCPU()). The
// stream of trials is cut into fixed blocks, each drawn from its own PCG
// (math/rand/v2) derived from seed and the block number, so the result
// depends only on (inputs, corr, f, trials, seed), not on workers. trials
// must lie between 2000 (J = 100/(1 − p), JCGM 101:2008 7.9.4) and 10⁷.
func MonteCarlo(inputs []Input, corr [][]float64, f Model, trials int, seed uint64, workers int) (*MonteCarloResult, error) {
	if trials < mcMinTrials || trials > mcMaxTrials {
		return nil, fmt.Errorf("monte carlo: %d trials are outside %d to %d", trials, mcMinTrials, mcMaxTrials)
	}
	p, err := mcNewPlan(inputs, corr, f)
	if err != nil {
		return nil, fmt.Errorf("monte carlo: %w", err)
	}
	if workers, err = mcWorkers(workers); err != nil {
		return nil, fmt.Errorf("monte carlo: %w", err)
	}
	y := make([]float64, trials)
	if err := p.run(y, seed, 0, workers); err != nil {
		return nil, fmt.Errorf("monte carlo: %w", err)
	}
	r := mcSummarise(y)
	r.Seed = seed
	return r, nil
}

// MonteCarloAdaptive runs the adaptive Monte Carlo procedure of
// JCGM 101:2008 7.9.4, taking two significant digits of u(y) as
// meaningful: batches h = 1, 2, … of M = max(J, 10⁴) = 10⁴ trials are drawn
// (J = 2000 at p = 0.95) until, for each of y, u(y), y_low and y_high of the
// batches (symmetric interval),
//
//	2·s ≤ δ,   s² = Σ_r (a_r − ā)²/(h(h − 1))
//
// where δ = ½·10^l is the numerical tolerance of u(y) = c·10^l (c of two
// digits) from all h·M values so far (JCGM 101:2008 7.9.2). The result is
// then formed from all h·M values, exactly as MonteCarlo(…, h·M, seed, …)
// would form it: the batches are consecutive parts of the same stream of
// trials. The procedure stops at 10⁷ trials (1000 batches); if the results
// are not stable by then it returns the result so far together with an
// error wrapping ErrNotStabilised.
func MonteCarloAdaptive(inputs []Input, corr [][]float64, f Model, seed uint64, workers int) (*MonteCarloResult, error) {
	p, err := mcNewPlan(inputs, corr, f)
	if err != nil {
		return nil, fmt.Errorf("monte carlo: %w", err)
	}
	if workers, err = mcWorkers(workers); err != nil {
		return nil, fmt.Errorf("monte carlo: %w", err)
	}
	return p.adaptive(seed, workers, mcMaxTrials)
}

// adaptive runs the procedure of MonteCarloAdaptive with a cap of maxTrials.
func (p *mcPlan) adaptive(seed uint64, workers, maxTrials int) (*MonteCarloResult, error) {
	var (
		y       = make([]float64, 0, 8*mcBatch)
		scratch = make([]float64, mcBatch)
		batch   [4][]float64 // per batch: mean, u, low, high
		ss      float64      // Σ of the batches' sums of squared deviations
	)
	for h := 1; ; h++ {
		start := len(y)
		y = slices.Grow(y, mcBatch)[:start+mcBatch]
		if err := p.run(y[start:], seed, start/mcBlock, workers); err != nil {
			return nil, fmt.Errorf("monte carlo: %w", err)
		}
		m, v := stat.MeanVariance(y[start:], nil)
		copy(scratch, y[start:])
		slices.Sort(scratch)
		low, high := mcSymmetric(scratch)
		for k, a := range [4]float64{m, math.Sqrt(v), low, high} {
			batch[k] = append(batch[k], a)
		}
		ss += v * (mcBatch - 1)
		if h == 1 {
			continue
		}

		// u(y) of all h·M values, pooled from the batches: the total sum
		// of squares is Σ SS_r + M·Σ(ȳ_r − ȳ)² (Chan, Golub & LeVeque,
		// Am. Stat. 37 (1983) 242, eq. 2.1 for equal parts).
		_, vMeans := stat.MeanVariance(batch[0], nil)
		uAll := math.Sqrt((ss + mcBatch*vMeans*float64(h-1)) / float64(h*mcBatch-1))
		delta := budgetTolerance(uAll)
		spread := 0.0
		for k := range batch {
			_, vk := stat.MeanVariance(batch[k], nil)
			spread = math.Max(spread, 2*math.Sqrt(vk/float64(h)))
		}
		stable := spread <= delta
		if stable || len(y)+mcBatch > maxTrials {
			r := mcSummarise(y)
			r.Seed = seed
			r.Adaptive = true
			r.Batches = h
			r.Tolerance = delta
			r.Spread = spread
			if !stable {
				return r, fmt.Errorf("monte carlo: %w after %d trials: 2s = %.3g exceeds δ = %.3g",
					ErrNotStabilised, len(y), spread, delta)
			}
			return r, nil
		}
	}
}

// ValidateGUM compares the GUM coverage interval y ± U of b with the
// probabilistically symmetric Monte Carlo interval of mc (JCGM 101:2008 8.2):
//
//	d_low  = |y − U − y_low|,   d_high = |y + U − y_high|
//
// The GUM result is validated when both are at most δ, the numerical
// tolerance of u_c(y) = c·10^l with two significant digits, δ = ½·10^l
// (JCGM 101:2008 7.9.2). It is not validated when the two coverage
// probabilities differ. ValidateGUM also records the outcome in mc
// (GUMValidated, DLow, DHigh, Delta). Nil arguments give false and NaNs.
func ValidateGUM(b *Budget, mc *MonteCarloResult) (ok bool, dLow, dHigh, delta float64) {
	if b == nil || mc == nil {
		return false, math.NaN(), math.NaN(), math.NaN()
	}
	dLow = math.Abs(b.Value - b.Expanded - mc.Low)
	dHigh = math.Abs(b.Value + b.Expanded - mc.High)
	delta = budgetTolerance(b.U)
	ok = dLow <= delta && dHigh <= delta && math.Abs(b.Coverage-mc.Coverage) < 1e-9
	mc.GUMValidated, mc.DLow, mc.DHigh, mc.Delta = ok, dLow, dHigh, delta
	return ok, dLow, dHigh, delta
}

// mcWorkers checks the number of goroutines asked for.
func mcWorkers(workers int) (int, error) {
	switch {
	case workers < 0:
		return 0, fmt.Errorf("%d workers: want 0 (one per CPU) or more", workers)
	case workers == 0:
		return runtime.NumCPU(), nil
	}
	return workers, nil
}

// mcSummarise sorts y in place and forms the result of JCGM 101:2008 7.6
// and 7.7 from it.
func mcSummarise(y []float64) *MonteCarloResult {
	m, v := stat.MeanVariance(y, nil)
	slices.Sort(y)
	r := &MonteCarloResult{Trials: len(y), Mean: m, U: math.Sqrt(v), Coverage: mcCoverage}
	r.Low, r.High = mcSymmetric(y)
	q := mcCount(len(y))
	best := 0
	for i := 1; i+q < len(y); i++ {
		if y[i+q]-y[i] < y[best+q]-y[best] {
			best = i
		}
	}
	r.ShortestLow, r.ShortestHigh = y[best], y[best+q]
	return r
}

// mcCount returns q = ⌊pM + ½⌋, the number of order statistics spanned by
// the coverage interval (JCGM 101:2008 7.7.1).
func mcCount(m int) int {
	return int(math.Floor(mcCoverage*float64(m) + 0.5))
}

// mcSymmetric returns the probabilistically symmetric coverage interval of
// the sorted values y (JCGM 101:2008 7.7.2).
func mcSymmetric(y []float64) (low, high float64) {
	m := len(y)
	q := mcCount(m)
	r := (m - q + 1) / 2 // 1-based; (M − q)/2 when M − q is even
	return y[r-1], y[r-1+q]
}

// mcKind says how one input is drawn.
type mcKind int

const (
	mcFixed mcKind = iota // u = 0: the estimate itself
	mcNormal
	mcRectangular
	mcTriangular
	mcStudentT
	mcJoint // correlated normal
)

// mcPlan is everything the workers need to draw the inputs of a trial.
type mcPlan struct {
	f     Model
	kind  []mcKind
	mu    []float64
	scale []float64 // u, half-width a, or t scale s
	nu    []float64 // ν of StudentT inputs
	joint []int     // indices of correlated inputs, in input order
	// lu holds the rows of D·L for the correlated inputs, packed: row a
	// (the a-th correlated input) has a+1 entries.
	lu []float64
}

// mcNewPlan checks the inputs and prepares the sampling.
func mcNewPlan(inputs []Input, corr [][]float64, f Model) (*mcPlan, error) {
	l, err := budgetCheck(inputs, corr, f)
	if err != nil {
		return nil, err
	}
	n := len(inputs)
	p := &mcPlan{
		f:     f,
		kind:  make([]mcKind, n),
		mu:    make([]float64, n),
		scale: make([]float64, n),
		nu:    make([]float64, n),
	}
	for i, in := range inputs {
		p.mu[i] = in.Value
		correlated := false
		for j := range n {
			if corr != nil && j != i && corr[i][j] != 0 {
				correlated = true
			}
		}
		switch {
		case correlated && in.Dist != Normal:
			return nil, fmt.Errorf("%s is correlated but %v: only normal inputs can be correlated", budgetName(i, in), in.Dist)
		case correlated:
			p.kind[i] = mcJoint
			p.joint = append(p.joint, i)
		case in.U == 0:
			p.kind[i] = mcFixed
		case in.Dist == Normal:
			p.kind[i], p.scale[i] = mcNormal, in.U
		case in.Dist == Rectangular:
			p.kind[i], p.scale[i] = mcRectangular, math.Sqrt(3)*in.U
		case in.Dist == Triangular:
			p.kind[i], p.scale[i] = mcTriangular, math.Sqrt(6)*in.U
		case in.Dist == StudentT:
			if math.IsInf(in.DoF, 1) || in.DoF <= 2 {
				return nil, fmt.Errorf("%s: a t distribution with standard deviation u needs finite degrees of freedom above 2, not %g", budgetName(i, in), in.DoF)
			}
			p.kind[i], p.nu[i] = mcStudentT, in.DoF
			p.scale[i] = in.U * math.Sqrt((in.DoF-2)/in.DoF)
		}
	}
	// L is zero outside the correlated inputs (their rows and columns of R
	// are those of the identity), so the factor of their sub-matrix is the
	// sub-matrix of L.
	for a, i := range p.joint {
		for _, j := range p.joint[:a+1] {
			p.lu = append(p.lu, inputs[i].U*l[i][j])
		}
	}
	return p, nil
}

// run fills y with consecutive trials of the stream, starting at block
// first, using workers goroutines.
func (p *mcPlan) run(y []float64, seed uint64, first, workers int) error {
	blocks := (len(y) + mcBlock - 1) / mcBlock
	workers = max(1, min(workers, blocks))
	bad := make([]int, blocks) // first trial of each block with a non-finite value, +1
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			var src rand.PCG
			rng := rand.New(&src)
			x := make([]float64, len(p.mu))
			z := make([]float64, len(p.joint))
			for {
				b := int(next.Add(1) - 1)
				if b >= blocks {
					return
				}
				src.Seed(seed, mcMix(uint64(first+b)))
				lo, hi := b*mcBlock, min((b+1)*mcBlock, len(y))
				for t := lo; t < hi; t++ {
					p.draw(rng, x, z)
					v := p.f(x)
					if bad[b] == 0 && (math.IsNaN(v) || math.IsInf(v, 0)) {
						bad[b] = t + 1
					}
					y[t] = v
				}
			}
		})
	}
	wg.Wait()
	for _, t := range bad {
		if t != 0 {
			return fmt.Errorf("model value is not finite at trial %d", first*mcBlock+t)
		}
	}
	return nil
}

// draw sets x to one draw of the inputs; z is scratch for the correlated
// ones.
func (p *mcPlan) draw(rng *rand.Rand, x, z []float64) {
	a := 0
	for i, k := range p.kind {
		switch k {
		case mcFixed:
			x[i] = p.mu[i]
		case mcNormal:
			x[i] = p.mu[i] + p.scale[i]*rng.NormFloat64()
		case mcRectangular:
			x[i] = p.mu[i] + p.scale[i]*(2*rng.Float64()-1)
		case mcTriangular:
			x[i] = p.mu[i] + p.scale[i]*(rng.Float64()+rng.Float64()-1)
		case mcStudentT:
			x[i] = p.mu[i] + p.scale[i]*mcStudent(rng, p.nu[i])
		case mcJoint:
			z[a] = rng.NormFloat64()
			a++
		}
	}
	off := 0
	for a, i := range p.joint {
		s := p.mu[i]
		for b, c := range p.lu[off : off+a+1] {
			s += c * z[b]
		}
		x[i] = s
		off += a + 1
	}
}

// mcStudent draws from Student's t distribution with ν degrees of freedom
// by Bailey's polar method (R. W. Bailey, Math. Comp. 62 (1994) 779):
// (U, V) uniform in the unit disc, W = U² + V², T = U·√(ν(W^(−2/ν) − 1)/W).
func mcStudent(rng *rand.Rand, nu float64) float64 {
	for {
		u, v := 2*rng.Float64()-1, 2*rng.Float64()-1
		w := u*u + v*v
		if w > 0 && w <= 1 {
			return u * math.Sqrt(nu*(math.Pow(w, -2/nu)-1)/w)
		}
	}
}

// mcMix is the SplitMix64 finaliser (Steele, Lea & Flood, OOPSLA 2014), used
// to spread block numbers over the PCG's second seed word.
func mcMix(z uint64) uint64 {
	z += 0x9e3779b97f4a7c15
	z = (z ^ z>>30) * 0xbf58476d1ce4e5b9
	z = (z ^ z>>27) * 0x94d049bb133111eb
	return z ^ z>>31
}
