package problem

import (
	"math"
	"strings"
	"testing"

	"plumb/forward/tides"
)

const tidalConfig = `planet: {name: Testa, radius_km: 2000}
layers:
  - name: core
    outer_radius_km: 1000
    density_kg_m3: 8000
    vp_km_s: 6
    state: {prior: categorical, values: [liquid, solid]}
    vs_km_s: 3
  - name: mantle
    density_kg_m3: 3500
    vp_km_s: 8
    vs_km_s: 4.5
    viscosity_pa_s: {prior: log_uniform, min: 1e14, max: 1e18}
    rheology: andrade
    andrade_alpha: 0.3
    andrade_zeta: 1
tides: {period_h: 24}
observations:
  k2: {value: 0.1, sigma: 0.01}
  tidal_q: {value: 50, sigma: 10}
`

// The k2 and tidal_q predictions are the complex Love number of forward/tides at the configured
// period with the configured rheology (whose physics is checked against the Kelvin–Maxwell and
// Kelvin–Andrade formulas there).
func TestTidalObservables(t *testing.T) {
	p := buildConfig(t, tidalConfig)
	if strings.Join(p.Space.Names(), ",") != "core_state,mantle_viscosity_pa_s" {
		t.Fatalf("parameters %v", p.Space.Names())
	}
	x := []float64{0, 1e16}
	der := make([]float64, p.NumDerived())
	if lp := p.LogDensity(x, der); math.IsInf(lp, 0) || math.IsNaN(lp) {
		t.Fatalf("log density %g", lp)
	}
	st, err := p.Solve(x)
	if err != nil {
		t.Fatal(err)
	}
	rh := []tides.Rheology{{}, {Kind: tides.Andrade, Viscosity: 1e16, Alpha: 0.3, Zeta: 1}}
	k, _, _, err := tides.ComplexLove(st, 2, 24*3600, rh)
	if err != nil {
		t.Fatal(err)
	}
	if der[2] != real(k) || der[3] != tides.QualityFactor(k) {
		t.Errorf("pred k2 %g, Q %g; tides gives %g, %g", der[2], der[3], real(k), tides.QualityFactor(k))
	}
	// A liquid core raises k2 over a solid one (physical ordering; the same check on the tidal
	// model itself is in forward/tides).
	derSolid := make([]float64, p.NumDerived())
	p.LogDensity([]float64{1, 1e16}, derSolid)
	if !(der[2] > derSolid[2]) {
		t.Errorf("k2 liquid core %g not above solid core %g", der[2], derSolid[2])
	}
	// The same config without a period gives the static elastic k2.
	pe := buildConfig(t, strings.Replace(strings.Replace(tidalConfig, "tides: {period_h: 24}\n", "", 1),
		"  tidal_q: {value: 50, sigma: 10}\n", "", 1))
	se, _ := pe.Solve(x)
	ke, _, _, _ := tides.Love(se, 2)
	pe.LogDensity(x, der)
	if der[2] != ke {
		t.Errorf("static k2 %g, tides.Love %g", der[2], ke)
	}
}

func TestTidalConfigErrors(t *testing.T) {
	cases := []configEdit{
		{"q without period", "tides: {period_h: 24}\n", "", "observations.tidal_q"},
		{"bad period", "period_h: 24", "period_h: -3", "tides.period_h"},
		{"unknown rheology", "rheology: andrade", "rheology: burgers", "layers[1].rheology"},
		{"andrade without alpha", "    andrade_alpha: 0.3\n", "", "layers[1].andrade_alpha"},
		{"rheology without viscosity", "    viscosity_pa_s: {prior: log_uniform, min: 1e14, max: 1e18}\n", "", "layers[1].viscosity_pa_s"},
		{"alpha for maxwell", "rheology: andrade", "rheology: maxwell", "layers[1].rheology"},
		{"unknown tides key", "tides: {period_h: 24}", "tides: {period_h: 24, degree: 3}", "tides"},
	}
	checkEdits(t, tidalConfig, cases)
}
