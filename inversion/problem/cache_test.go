package problem

import (
	"math"
	"reflect"
	"testing"
)

// A chain's structure cache changes nothing but the work: along a walk that alternates moves of
// an event's source only (cache hits) with moves of the structure (misses), the chain target's
// log density and derived values equal the problem's bit for bit, and a hit reuses the cached
// structure.
func TestStructCacheIsTransparent(t *testing.T) {
	p := buildConfig(t, seismicConfig)
	ct, ok := p.ChainTarget().(*chainTarget)
	if !ok {
		t.Fatal("a problem with event parameters gets no cache")
	}
	deg := math.Pi / 180
	// core radius, core state, quake_a distance, quake_a depth, quake_b origin time.
	walk := [][]float64{
		{1600e3, 0, 55 * deg, 25e3, 12},
		{1600e3, 0, 56 * deg, 25e3, 12},   // event only: hit
		{1600e3, 0, 56 * deg, 40e3, -3},   // event only: hit
		{1650e3, 0, 56 * deg, 40e3, -3},   // structure: miss
		{1650e3, 1, 56 * deg, 40e3, -3},   // core state: miss
		{1650e3, 1, 57 * deg, 2900e3, -3}, // source below the core: −Inf, structure still cached
		{1650e3, 1, 57 * deg, 10e3, -3},   // event only: hit
	}
	hits := []bool{false, true, true, false, false, true, true}
	for i, x := range walk {
		before := ct.cache.sh
		hit := ct.cache.hit(p, x)
		d1, d2 := make([]float64, p.NumDerived()), make([]float64, p.NumDerived())
		l1, l2 := ct.LogDensity(x, d1), p.LogDensity(x, d2)
		if hit != hits[i] || (hit && ct.cache.sh != before) {
			t.Errorf("step %d: cache hit %v (want %v), structure reused %v", i, hit, hits[i], ct.cache.sh == before)
		}
		if l1 != l2 || (!math.IsInf(l1, -1) && !reflect.DeepEqual(d1, d2)) {
			t.Errorf("step %d: cached %v %v, fresh %v %v", i, l1, d1, l2, d2)
		}
	}
	if _, ok := buildConfig(t, testConfig).ChainTarget().(*Problem); !ok {
		t.Error("a problem without event parameters should be used as it is")
	}
}
