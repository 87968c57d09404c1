package runfolder_test

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"plumb/inversion/problem"
	"plumb/inversion/run"
	"plumb/inversion/runfolder"
)

// A run written by package run, opened the way every reader opens it: config and problem built
// once, checkpoint, and the sample table read on first use.
func ExampleOpen() {
	tmp, err := os.MkdirTemp("", "plumb-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(tmp)
	cfgPath := filepath.Join(tmp, "c.yaml")
	text := `planet: {name: Example, radius_km: 3000}
layers:
  - {name: core, outer_radius_km: {prior: uniform, min: 500, max: 2500}, density_kg_m3: 8000, vp_km_s: 5, state: liquid}
  - {name: mantle, density_kg_m3: {prior: uniform, min: 3000, max: 4000}, vp_km_s: 8, vs_km_s: 4.5}
observations:
  mass_kg: {value: 4.0e23, sigma: 4.0e20}
sampler: {chains: 2, warmup_steps: 100, steps: 200, seed: 1}
output: {checkpoint_every_steps: 100, profiles: {every_draws: 0}}
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
	b, err := f.Samples()
	if err != nil {
		fmt.Println(err)
		return
	}
	chain, _ := b.Int64(runfolder.ColChain)
	fmt.Printf("%s: complete %v, %d parts, %d draws of %d chains\n", f.Problem.Name, f.Checkpoint.Complete,
		len(f.Checkpoint.Parts), b.Len(), chain[len(chain)-1]+1)
	// A folder without a resolved config is not a run folder.
	_, err = runfolder.Open(tmp)
	fmt.Println(errors.Is(err, runfolder.ErrNotRunFolder))
	// Output:
	// Example: complete true, 2 parts, 400 draws of 2 chains
	// true
}
