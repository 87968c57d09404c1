package run

import (
	"fmt"
	"math"
	"path/filepath"

	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// monitorCap bounds the draws per chain that the monitor keeps (memory: chains × parameters ×
// monitorCap × 8 bytes, ≈ 10 MB for 4 chains × 20 parameters).
const monitorCap = 16384

// monitor keeps a bounded subset of every chain's draws of the continuous parameters, for the
// convergence diagnostics of the progress line and the stopping rule. It keeps draw i of each
// chain while i is a multiple of stride; when a chain holds more than monitorCap draws the stride
// doubles and every other kept draw goes. The kept set is therefore {i : i mod stride = 0},
// whatever the order in which draws arrive — the monitor rebuilt from the Parquet parts on resume
// equals the one an uninterrupted run holds, so the stopping rule decides identically. With a
// stride above 1 the bulk-ESS is that of the thinned history, a lower bound of the full one.
type monitor struct {
	params []int     // indices of the continuous parameters in the space
	toUnit []float64 // their output-unit factors (values are kept exactly as written to Parquet)
	stride int64
	kept   [][][]float64 // [parameter][chain] → kept values
}

func newMonitor(p *problem.Problem, chains int) *monitor {
	m := &monitor{stride: 1}
	for i, par := range p.Space.Params {
		if par.Levels() == 0 {
			m.params = append(m.params, i)
			m.toUnit = append(m.toUnit, par.ToUnit)
		}
	}
	m.kept = make([][][]float64, len(m.params))
	for k := range m.kept {
		m.kept[k] = make([][]float64, chains)
	}
	return m
}

// add records draw index i of chain c with the parameter vector x (SI).
func (m *monitor) add(c int, i int64, x []float64) {
	m.addOutput(c, i, func(k int) float64 { return x[m.params[k]] * m.toUnit[k] })
}

// addOutput records draw i of chain c whose k-th monitored value (output units) is v(k).
func (m *monitor) addOutput(c int, i int64, v func(k int) float64) {
	if i%m.stride != 0 {
		return
	}
	for k := range m.params {
		m.kept[k][c] = append(m.kept[k][c], v(k))
	}
	if len(m.params) > 0 && len(m.kept[0][c]) > monitorCap {
		m.stride *= 2
		for k := range m.kept {
			for ch, d := range m.kept[k] {
				n := 0
				for j := 0; j < len(d); j += 2 { // kept index j is draw j·(stride/2)
					d[n] = d[j]
					n++
				}
				m.kept[k][ch] = d[:n]
			}
		}
	}
}

// addParts rebuilds the monitor from the sample parts of a run folder (resume).
func (m *monitor) addParts(dir string, p *problem.Problem) error {
	parts, err := store.ListParts(filepath.Join(dir, runfolder.SamplesDir))
	if err != nil {
		return err
	}
	for _, part := range parts {
		b, _, err := store.ReadPart(part)
		if err != nil {
			return fmt.Errorf("rebuild diagnostics: %w", err)
		}
		chains, ok1 := b.Int64(runfolder.ColChain)
		draws, ok2 := b.Int64(runfolder.ColDraw)
		cols := make([][]float64, len(m.params))
		ok := ok1 && ok2
		for k, i := range m.params {
			var okc bool
			cols[k], okc = b.Float64(p.Space.Params[i].Name)
			ok = ok && okc
		}
		if !ok {
			return fmt.Errorf("rebuild diagnostics: %s lacks a parameter column", part)
		}
		if len(m.params) == 0 {
			return nil
		}
		for r := range chains {
			if c := int(chains[r]); c >= 0 && c < len(m.kept[0]) {
				m.addOutput(c, draws[r], func(k int) float64 { return cols[k][r] })
			}
		}
	}
	return nil
}

// diagnostics holds the convergence diagnostics of the monitored parameters.
type diagnostics struct {
	rhat, ess []float64 // per monitored parameter; NaN while undefined (e.g. too few draws)
}

// diagnostics computes the rank-normalized split-R̂ and the bulk-ESS of every monitored
// parameter.
func (m *monitor) diagnostics() diagnostics {
	d := diagnostics{rhat: make([]float64, len(m.params)), ess: make([]float64, len(m.params))}
	for k := range m.params {
		d.rhat[k], d.ess[k] = mcmc.RankRHat(m.kept[k]), mcmc.ESSBulk(m.kept[k])
	}
	return d
}

// worst returns the largest R̂ and the smallest bulk-ESS (NaN if none is defined), and the
// parameter of each.
func (m *monitor) worst(p *problem.Problem, d diagnostics) (worstRHat float64, rhatName string, minESS float64, essName string) {
	worstRHat, minESS = math.NaN(), math.NaN()
	for k, i := range m.params {
		name := p.Space.Params[i].Name
		if r := d.rhat[k]; !math.IsNaN(r) && (math.IsNaN(worstRHat) || r > worstRHat) {
			worstRHat, rhatName = r, name
		}
		if e := d.ess[k]; !math.IsNaN(e) && (math.IsNaN(minESS) || e < minESS) {
			minESS, essName = e, name
		}
	}
	return worstRHat, rhatName, minESS, essName
}

// converged applies the stopping rule: every monitored parameter has a defined R̂ below the
// threshold and a bulk-ESS above it. A parameter whose diagnostics are undefined (a chain that
// never moved) does not count as converged.
func (m *monitor) converged(rule *problem.StopConfig, d diagnostics) bool {
	if rule == nil || len(m.params) == 0 {
		return false
	}
	for k := range m.params {
		if !(d.rhat[k] < rule.RHatBelow) || !(d.ess[k] > rule.ESSAbove) {
			return false
		}
	}
	return true
}
