package mcmc

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/stat/distuv"
)

// The building blocks of the diagnostics in diag.go: autocovariance by FFT, the combination of
// several chains into one ESS, splitting, rank normalisation, folding and indicators.

// Autocorrelation returns the sample autocorrelation ρ̂ₖ = γ̂ₖ/γ̂₀ of x at lags k = 0..n−1, with the
// biased autocovariance γ̂ₖ = (1/n)·Σₜ (xₜ − x̄)(xₜ₊ₖ − x̄) (Geyer 1992 recommends the divisor n).
// It is computed by FFT with the centred series zero-padded to at least 2n−1 points, so there is no
// circular wrap-around. An empty x gives an empty result; a constant x, or one holding NaN or
// ±Inf, gives all NaN (γ̂₀ = 0 or undefined).
func Autocorrelation(x []float64) []float64 {
	n := len(x)
	out := make([]float64, n)
	if n == 0 {
		return out
	}
	if !finiteDiag(x) || constantDiag([][]float64{x}) {
		for i := range out {
			out[i] = math.NaN()
		}
		return out
	}
	acov := newAutocovFFT(n).autocov(out, x)
	g0 := acov[0]
	if !(g0 > 0) {
		for i := range out {
			out[i] = math.NaN()
		}
		return out
	}
	for i := range acov {
		acov[i] /= g0
	}
	acov[0] = 1
	return acov
}

// autocovFFT holds an FFT plan and work space for autocovariances of series of one length.
type autocovFFT struct {
	n     int
	fft   *fourier.FFT
	buf   []float64
	coeff []complex128
}

// newAutocovFFT prepares autocovariances of length-n series (n ≥ 1), padding to the smallest
// size ≥ 2n whose only prime factors are 2, 3 and 5.
func newAutocovFFT(n int) *autocovFFT {
	size := fftSizeDiag(2 * n)
	return &autocovFFT{
		n:     n,
		fft:   fourier.NewFFT(size),
		buf:   make([]float64, size),
		coeff: make([]complex128, size/2+1),
	}
}

// autocov writes the biased autocovariance of x (len(x) == a.n) at lags 0..n−1 into dst
// (len n) and returns it.
func (a *autocovFFT) autocov(dst, x []float64) []float64 {
	n := a.n
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= float64(n)
	for i, v := range x {
		a.buf[i] = v - mean
	}
	clear(a.buf[n:])
	a.fft.Coefficients(a.coeff, a.buf)
	for i, c := range a.coeff {
		a.coeff[i] = complex(real(c)*real(c)+imag(c)*imag(c), 0)
	}
	a.fft.Sequence(a.buf, a.coeff)
	// The unnormalised inverse multiplies by the transform length.
	scale := 1 / (float64(len(a.buf)) * float64(n))
	for k := range n {
		dst[k] = a.buf[k] * scale
	}
	return dst
}

// fftSizeDiag returns the smallest integer ≥ n (n ≥ 1) of the form 2^a·3^b·5^c.
func fftSizeDiag(n int) int {
	for m := max(n, 1); ; m++ {
		r := m
		for _, f := range [...]int{2, 3, 5} {
			for r%f == 0 {
				r /= f
			}
		}
		if r == 1 {
			return m
		}
	}
}

// diagValid reports whether draws has at least minChains chains of one common length
// ≥ diagMinDraws, all values finite and not all equal.
func diagValid(draws [][]float64, minChains int) bool {
	if len(draws) < minChains || len(draws) == 0 {
		return false
	}
	n := len(draws[0])
	if n < diagMinDraws {
		return false
	}
	for _, ch := range draws {
		if len(ch) != n || !finiteDiag(ch) {
			return false
		}
	}
	return !constantDiag(draws)
}

// finiteDiag reports whether every value of x is finite.
func finiteDiag(x []float64) bool {
	for _, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// constantDiag reports whether all values in draws are equal.
func constantDiag(draws [][]float64) bool {
	first := draws[0][0]
	for _, ch := range draws {
		for _, v := range ch {
			if v != first {
				return false
			}
		}
	}
	return true
}

// splitChainsDiag returns the 2m half-chains of m chains of length n: iterations [0, ⌊n/2⌋) and
// [⌈n/2⌉, n). The halves share memory with draws.
func splitChainsDiag(draws [][]float64) [][]float64 {
	out := make([][]float64, 0, 2*len(draws))
	for _, ch := range draws {
		n := len(ch)
		out = append(out, ch[:n/2], ch[n-n/2:])
	}
	return out
}

// pooledSortedDiag returns all draws in one sorted slice.
func pooledSortedDiag(draws [][]float64) []float64 {
	total := 0
	for _, ch := range draws {
		total += len(ch)
	}
	s := make([]float64, 0, total)
	for _, ch := range draws {
		s = append(s, ch...)
	}
	slices.Sort(s)
	return s
}

// rankNormalDiag returns the rank-normalised draws z = Φ⁻¹((r − 3/8)/(S + 1/4)), r the rank of
// each draw among all S pooled draws with ties given their average rank.
func rankNormalDiag(draws [][]float64) [][]float64 {
	// Sort (value, flat position) pairs; ties then form runs, handled in one pass each.
	type item struct {
		v float64
		k int
	}
	total := 0
	for _, ch := range draws {
		total += len(ch)
	}
	items := make([]item, 0, total)
	for _, ch := range draws {
		for _, v := range ch {
			items = append(items, item{v, len(items)})
		}
	}
	slices.SortFunc(items, func(a, b item) int {
		switch {
		case a.v < b.v:
			return -1
		case a.v > b.v:
			return 1
		}
		return 0
	})
	flat := make([]float64, total)
	s := float64(total)
	for lo := 0; lo < total; {
		hi := lo + 1
		for hi < total && items[hi].v == items[lo].v {
			hi++
		}
		// 1-based ranks lo+1..hi share their average.
		r := float64(lo+1+hi) / 2
		z := distuv.UnitNormal.Quantile((r - 0.375) / (s + 0.25))
		for _, it := range items[lo:hi] {
			flat[it.k] = z
		}
		lo = hi
	}
	out := make([][]float64, len(draws))
	for c, ch := range draws {
		out[c], flat = flat[:len(ch):len(ch)], flat[len(ch):]
	}
	return out
}

// foldDiag returns |x − median| with the median (type-7, p = 1/2) over all draws.
func foldDiag(draws [][]float64) [][]float64 {
	med := quantile7Sorted(pooledSortedDiag(draws), 0.5)
	out := make([][]float64, len(draws))
	for c, ch := range draws {
		out[c] = make([]float64, len(ch))
		for i, v := range ch {
			out[c][i] = math.Abs(v - med)
		}
	}
	return out
}

// indicatorDiag returns the draws mapped to 1 where x ≤ q and 0 elsewhere.
func indicatorDiag(draws [][]float64, q float64) [][]float64 {
	out := make([][]float64, len(draws))
	for c, ch := range draws {
		out[c] = make([]float64, len(ch))
		for i, v := range ch {
			if v <= q {
				out[c][i] = 1
			}
		}
	}
	return out
}

// meanVarDiag returns the mean and the sample variance (divisor S−1) of all draws pooled.
func meanVarDiag(draws [][]float64) (mean, variance float64) {
	n := 0
	for _, ch := range draws {
		for _, v := range ch {
			mean += v
		}
		n += len(ch)
	}
	mean /= float64(n)
	for _, ch := range draws {
		for _, v := range ch {
			d := v - mean
			variance += d * d
		}
	}
	return mean, variance / float64(n-1)
}

// chainMeanVarDiag returns the sample mean and sample variance (divisor n−1) of one chain.
func chainMeanVarDiag(x []float64) (mean, variance float64) {
	for _, v := range x {
		mean += v
	}
	mean /= float64(len(x))
	for _, v := range x {
		d := v - mean
		variance += d * d
	}
	return mean, variance / float64(len(x)-1)
}

// sampleVarDiag returns the sample variance (divisor len−1) of x, len(x) ≥ 2.
func sampleVarDiag(x []float64) float64 {
	_, v := chainMeanVarDiag(x)
	return v
}

// rhatDiag returns √((n−1)/n + (B/n)/W) for m ≥ 2 chains of common length n ≥ 2 (BDA3 eq.
// 11.1–11.4). It is NaN when all values are equal and +Inf when only the within-chain variance
// vanishes.
func rhatDiag(chains [][]float64) float64 {
	m := len(chains)
	n := len(chains[0])
	if m < 2 || n < 2 || constantDiag(chains) {
		return math.NaN()
	}
	means := make([]float64, m)
	w := 0.0
	for i, ch := range chains {
		mu, v := chainMeanVarDiag(ch)
		means[i] = mu
		w += v
	}
	w /= float64(m)
	bOverN := sampleVarDiag(means)
	nf := float64(n)
	if w == 0 {
		return math.Inf(1)
	}
	return math.Sqrt((nf-1)/nf + bOverN/w)
}

// essDiag returns the effective sample size of m ≥ 1 chains of common length n (V21 §3.2,
// eq. 10–13, with Geyer's 1992 initial monotone sequence). It is NaN for n < 3 or constant draws.
func essDiag(chains [][]float64) float64 {
	m := len(chains)
	n := len(chains[0])
	if n < 3 || constantDiag(chains) {
		return math.NaN()
	}
	plan := newAutocovFFT(n)
	// meanAcov[t] is the average over chains of the autocovariance at lag t.
	meanAcov := make([]float64, n)
	one := make([]float64, n)
	means := make([]float64, m)
	for i, ch := range chains {
		plan.autocov(one, ch)
		for t, g := range one {
			meanAcov[t] += g
		}
		for _, v := range ch {
			means[i] += v
		}
		means[i] /= float64(n)
	}
	nf := float64(n)
	for t := range meanAcov {
		meanAcov[t] /= float64(m)
	}
	// W: mean within-chain sample variance; var⁺ = (n−1)/n·W + B/n (BDA3 eq. 11.3).
	w := meanAcov[0] * nf / (nf - 1)
	varPlus := w * (nf - 1) / nf
	if m > 1 {
		varPlus += sampleVarDiag(means)
	}
	rhoAt := func(t int) float64 { return 1 - (w-meanAcov[t])/varPlus }

	// Geyer's initial positive sequence over pairs (ρ̂₂ₖ, ρ̂₂ₖ₊₁). The last pair computed, the
	// first with a negative sum or the one reaching lag n−3, is not summed in full: only its
	// even member enters, as in V21 eq. 13.
	rho := make([]float64, n)
	rho[0] = 1
	even, odd := 1.0, rhoAt(1)
	rho[1] = odd
	t := 0
	for t < n-5 && !math.IsNaN(even+odd) && even+odd > 0 {
		t += 2
		even, odd = rhoAt(t), rhoAt(t+1)
		if even+odd >= 0 {
			rho[t], rho[t+1] = even, odd
		}
	}
	maxT := t
	if even > 0 {
		rho[maxT] = even
	}
	// Initial monotone sequence: no pair sum may exceed the previous one.
	for t := 2; t <= maxT-2; t += 2 {
		if prev := rho[t-2] + rho[t-1]; rho[t]+rho[t+1] > prev {
			rho[t] = prev / 2
			rho[t+1] = rho[t]
		}
	}
	sum := 0.0
	if maxT == 0 {
		// No pair beyond lag 1 was examined (n ≤ 5, or ρ̂₀ + ρ̂₁ ≤ 0): both reference
		// implementations then count ρ̂₀ in the sum, giving τ̂ = 2.
		sum = rho[0]
	}
	for _, r := range rho[:maxT] {
		sum += r
	}
	total := float64(m) * nf
	tau := -1 + 2*sum + rho[maxT]
	tau = math.Max(tau, 1/math.Log10(total))
	return total / tau
}
