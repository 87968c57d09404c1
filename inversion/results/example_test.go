package results_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"plumb/inversion/problem"
	"plumb/inversion/results"
	"plumb/inversion/run"
	"plumb/inversion/runfolder"
)

// The posterior summary of an opened run folder: draws, the prior of each parameter, and the
// probability of each layer state.
func ExampleSummarize() {
	tmp, err := os.MkdirTemp("", "plumb-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(tmp)
	cfgPath := filepath.Join(tmp, "c.yaml")
	text := `planet: {name: Example, radius_km: 3000}
layers:
  - name: core
    outer_radius_km: {prior: uniform, min: 500, max: 2500}
    density_kg_m3: 8000
    vp_km_s: 5
    vs_km_s: 2
    state: {prior: categorical, values: [liquid, solid]}
  - {name: mantle, density_kg_m3: {prior: uniform, min: 3000, max: 4000}, vp_km_s: 8, vs_km_s: 4.5}
observations:
  mass_kg: {value: 4.6e23, sigma: 4.0e21}
sampler: {chains: 2, warmup_steps: 200, steps: 400, seed: 1, prior_only: true}
output: {checkpoint_every_steps: 200, profiles: {every_draws: 0}}
`
	if err := os.WriteFile(cfgPath, []byte(text), 0o644); err != nil {
		fmt.Println(err)
		return
	}
	cfg, err := problem.Load(cfgPath, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	dir := filepath.Join(tmp, "run")
	if _, err := run.Start(context.Background(), cfg, cfgPath, dir, run.Options{Workers: 1}); err != nil {
		fmt.Println(err)
		return
	}
	f, err := runfolder.Open(dir)
	if err != nil {
		fmt.Println(err)
		return
	}
	s, err := results.Summarize(f)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d draws, complete %v, prior only %v\n", s.Planet, s.Draws, s.Complete, s.PriorOnly)
	for _, p := range s.Parameters {
		fmt.Printf("%s: prior %s\n", p.Name, p.Prior)
	}
	// In a prior-only run the state frequencies estimate the prior's 1/2 each.
	c := s.Categorical[0]
	fmt.Printf("%s: prior P(liquid) %.2f, sampled P(liquid) within 0.15 of it: %v\n", c.Name,
		c.Prior["liquid"], c.Probability["liquid"] > 0.35 && c.Probability["liquid"] < 0.65)
	// Output:
	// Example: 800 draws, complete true, prior only true
	// core_outer_radius_km: prior uniform(500, 2500) km
	// mantle_density_kg_m3: prior uniform(3000, 4000) kg/m3
	// core_state: prior P(liquid) 0.50, sampled P(liquid) within 0.15 of it: true
}
