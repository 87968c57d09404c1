package inversion

import (
	"path/filepath"
	"testing"
)

// BenchmarkLogDensity times one posterior evaluation of the demo problem (prior, model build,
// self-consistent structure, mass, moment of inertia, k2 and six seismic picks): the sampler's
// hot path.
func BenchmarkLogDensity(b *testing.B) {
	path := filepath.Join("..", "runs", "demo", "config.yaml")
	cfg, err := Load(path, nil)
	if err != nil {
		b.Fatal(err)
	}
	p, err := Build(cfg, path)
	if err != nil {
		b.Fatal(err)
	}
	x := make([]float64, p.Dim())
	for i, par := range p.Space.Params {
		x[i] = par.Prior.Quantile(0.5)
	}
	der := make([]float64, p.NumDerived())
	b.ReportAllocs()
	for b.Loop() {
		p.LogDensity(x, der)
	}
}
