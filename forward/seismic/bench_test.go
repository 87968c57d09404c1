package seismic

import (
	"testing"

	"plumb/internal/prem"
)

// benchPhases and benchDists are the workload of BenchmarkArrivals: 10
// phases × 3 distances = 30 calls per model.
var (
	benchPhases = []string{"P", "S", "PP", "SS", "PcP", "ScS", "ScP", "SKS", "PKP", "PKIKP"}
	benchDists  = []float64{30 * deg, 60 * deg, 120 * deg}
)

// benchShell is the shell thickness that cuts continental PREM into about 500
// shells.
const benchShell = 12.75e3

func benchQuery(b *testing.B, depth float64) {
	md, err := NewMediumShells(prem.MustLoadWithoutOcean(b), 3480*km, 1221.5*km, benchShell)
	if err != nil {
		b.Fatal(err)
	}
	phs := make([]Phase, len(benchPhases))
	for i, n := range benchPhases {
		phs[i] = mustPhase(b, n)
	}
	buf := make([]Arrival, 0, 64)
	// Build the sampled tables first (BenchmarkTable and BenchmarkModel
	// measure them): this is the query cost alone.
	for _, ph := range phs {
		if _, err := md.Arrivals(buf[:0], ph, 1, depth); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(md.Shells()), "shells")
	b.ResetTimer()
	for b.Loop() {
		for _, ph := range phs {
			for _, d := range benchDists {
				buf, err = md.Arrivals(buf[:0], ph, d, depth)
				if err != nil {
					b.Fatal(err)
				}
			}
		}
	}
}

// BenchmarkArrivals is the query cost of 30 calls (10 phases × 3 distances,
// surface source) on a 500-shell PREM; one op = one model's worth.
func BenchmarkArrivals(b *testing.B) { benchQuery(b, 0) }

// BenchmarkArrivalsDepth is BenchmarkArrivals for a source at 100 km depth.
func BenchmarkArrivalsDepth(b *testing.B) { benchQuery(b, 100*km) }

// BenchmarkNewMedium is the construction cost of the 500-shell PREM medium
// (discretisation and the sampled tables).
func BenchmarkNewMedium(b *testing.B) {
	m := prem.MustLoadWithoutOcean(b)
	for b.Loop() {
		if _, err := NewMediumShells(m, 3480*km, 1221.5*km, benchShell); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkNewMediumDefault is the construction cost with the default shells.
func BenchmarkNewMediumDefault(b *testing.B) {
	m := prem.MustLoadWithoutOcean(b)
	for b.Loop() {
		if _, err := NewMedium(m, 3480*km, 1221.5*km); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkModel is the whole per-model cost: construction of the 500-shell
// medium, the sampled tables its phases need, and the 30 calls.
func BenchmarkModel(b *testing.B) {
	m := prem.MustLoadWithoutOcean(b)
	phs := make([]Phase, len(benchPhases))
	for i, n := range benchPhases {
		phs[i] = mustPhase(b, n)
	}
	buf := make([]Arrival, 0, 64)
	for b.Loop() {
		md, err := NewMediumShells(m, 3480*km, 1221.5*km, benchShell)
		if err != nil {
			b.Fatal(err)
		}
		for _, ph := range phs {
			for _, d := range benchDists {
				if buf, err = md.Arrivals(buf[:0], ph, d, 0); err != nil {
					b.Fatal(err)
				}
			}
		}
	}
}

// BenchmarkTable is the cost of one family's sampled curve (built on the
// first query of one of its phases) on the 500-shell PREM.
func BenchmarkTable(b *testing.B) {
	md, err := NewMediumShells(prem.MustLoadWithoutOcean(b), 3480*km, 1221.5*km, benchShell)
	if err != nil {
		b.Fatal(err)
	}
	for t := range nTables {
		b.Run(phases[tableBase[t]].name, func(b *testing.B) {
			for b.Loop() {
				md.tabs[t] = table{}
				md.buildTable(t)
			}
			b.ReportMetric(float64(len(md.tabs[t].p)), "samples")
		})
	}
}
