package problem_test

import (
	"fmt"
	"math"

	"plumb/inversion/problem"
)

// A config (here from memory; problem.Load reads a file) built into a problem: its sampled
// parameters in SI inside and output units outside, its observations, and the log density of a
// parameter vector.
func ExampleBuild() {
	text := []byte(`planet: {name: Example, radius_km: 3000}
layers:
  - name: core
    outer_radius_km: {prior: uniform, min: 500, max: 2500}
    density_kg_m3: 8000
    vp_km_s: 5
    state: liquid
  - name: mantle
    density_kg_m3: {prior: uniform, min: 3000, max: 4000}
    vp_km_s: 8
    vs_km_s: 4.5
observations:
  mass_kg: {value: 4.0e23, sigma: 4.0e20}
  moi_factor: {value: 0.36, sigma: 0.004}
`)
	cfg, err := problem.Parse(text, "example.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := problem.Build(cfg, "example.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, par := range p.Space.Params {
		fmt.Printf("%s [%s], prior %s\n", par.Name, par.Unit, par.PriorString())
	}
	for _, o := range p.Observations {
		fmt.Printf("observed %s = %g ± %g\n", o.Observable.Key, o.Value/o.Observable.ToSI(), o.Sigma/o.Observable.ToSI())
	}
	// SI: m, kg/m³. The mass is (4/3)π(1500³·8000 + (3000³ − 1500³)·3500) km³·kg/m³ = 4.595e23 kg.
	x := []float64{1500e3, 3500}
	derived := make([]float64, p.NumDerived())
	lp := p.LogDensity(x, derived)
	fmt.Printf("finite log density: %v; predicted mass %.3e kg\n", !math.IsInf(lp, 0), derived[2])
	// A core larger than its prior allows has zero density.
	fmt.Println(p.LogDensity([]float64{2600e3, 3500}, derived))
	// Output:
	// core_outer_radius_km [km], prior uniform(500, 2500)
	// mantle_density_kg_m3 [kg/m3], prior uniform(3000, 4000)
	// observed mass_kg = 4e+23 ± 4e+20
	// observed moi_factor = 0.36 ± 0.004
	// finite log density: true; predicted mass 4.595e+23 kg
	// -Inf
}
