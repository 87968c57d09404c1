package seismic

import (
	"math"
	"sort"
	"strings"
	"sync"
	"testing"
)

func TestArrivalsErrors(t *testing.T) {
	md := premMedium(t)
	P := mustPhase(t, "P")
	nan := math.NaN()
	mantle := md.Radius() - 3480*km
	for _, c := range []struct {
		name        string
		ph          Phase
		dist, depth float64
		want        string
	}{
		{"zero phase", Phase{}, 1, 0, "invalid phase"},
		{"bad phase id", Phase{id: 200}, 1, 0, "invalid phase"},
		{"negative distance", P, -1e-9, 0, "distance"},
		{"distance beyond π", P, math.Pi + 1e-9, 0, "distance"},
		{"NaN distance", P, nan, 0, "distance"},
		{"Inf distance", P, math.Inf(1), 0, "distance"},
		{"negative depth", P, 1, -1, "depth"},
		{"depth at the CMB", P, 1, mantle, "depth"},
		{"depth in the core", P, 1, mantle + 1e3, "depth"},
		{"NaN depth", P, 1, nan, "depth"},
	} {
		dst := []Arrival{{Time: 42}}
		got, err := md.Arrivals(dst, c.ph, c.dist, c.depth)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
		if len(got) != 1 || got[0].Time != 42 {
			t.Errorf("%s: dst changed to %+v", c.name, got)
		}
	}
	// No arrival: dst unchanged, nil error.
	for _, c := range []struct {
		phase       string
		dist, depth float64
	}{{"P", 120 * deg, 0}, {"PcP", 150 * deg, 0}, {"PKP", 100 * deg, 0}, {"pP", 40 * deg, 0}, {"p", 10 * deg, 0}, {"p", 60 * deg, 30 * km}} {
		dst := []Arrival{{Time: 42}}
		got, err := md.Arrivals(dst, mustPhase(t, c.phase), c.dist, c.depth)
		if err != nil || len(got) != 1 || got[0].Time != 42 {
			t.Errorf("%s at %g°, depth %g km: %+v, %v; want dst unchanged and no error", c.phase, c.dist/deg, c.depth/km, got, err)
		}
	}
}

// Every phase at distances 0–180° and several source depths: no NaN, no
// error, non-negative times and ray parameters, arrivals ordered by time with
// the first marked, and each arrival's ray parameter reproduces its angle
// through the integrals (|Δ(p) − angle| ≤ 1e-9 rad).
func TestSweep(t *testing.T) {
	md := premMedium(t)
	var buf []Arrival
	count := 0
	for i := 1; i < len(phases); i++ {
		ph := Phase{id: uint8(i)}
		sp, _ := ph.spec()
		for _, depth := range []float64{0, 15 * km, 100 * km, 650 * km, 2800 * km} {
			src := md.newSource(depth)
			for dd := 0.0; dd <= 180; dd += 2.5 {
				var err error
				buf, err = md.Arrivals(buf[:0], ph, dd*deg, depth)
				if err != nil {
					t.Fatalf("%s at %g°, depth %g km: %v", ph, dd, depth/km, err)
				}
				for k, a := range buf {
					count++
					if !finite(a.Time) || !finite(a.RayParam) || a.Time < 0 || a.RayParam < 0 || !(a.Bottom >= 0 && a.Bottom <= md.Radius()) || math.IsNaN(a.DAngleDP) {
						t.Errorf("%s at %g°, depth %g km: bad arrival %+v", ph, dd, depth/km, a)
					}
					if a.First != (k == 0) {
						t.Errorf("%s at %g°: First = %v for arrival %d", ph, dd, a.First, k)
					}
					r, _, ok := md.eval(sp, &src, a.RayParam)
					if !ok || math.Abs(r.d-a.Angle) > 1e-9 {
						t.Errorf("%s at %g°, depth %g km: Δ(p) = %g, angle %g", ph, dd, depth/km, r.d, a.Angle)
					}
				}
				if !sort.SliceIsSorted(buf, func(i, j int) bool { return buf[i].Time < buf[j].Time }) {
					t.Errorf("%s at %g°: arrivals not ordered by time", ph, dd)
				}
			}
		}
	}
	t.Logf("%d arrivals checked", count)
}

// The Medium is safe for concurrent use, including the lazy tables.
func TestConcurrent(t *testing.T) {
	md := premMedium(t)
	ref := premMedium(t)
	names := []string{"P", "S", "PKP", "SKKS", "PKIKP", "ScS", "PP"}
	var wg sync.WaitGroup
	errs := make(chan string, 64)
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range 20 {
				name := names[(g+k)%len(names)]
				ph, _ := ParsePhase(name)
				d := float64(10+7*k) * deg
				a, err1 := md.Arrivals(nil, ph, d, 0)
				b, err2 := ref.Arrivals(nil, ph, d, 0)
				if err1 != nil || err2 != nil || len(a) != len(b) {
					errs <- name
					return
				}
				for i := range a {
					if a[i] != b[i] {
						errs <- name
						return
					}
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for name := range errs {
		t.Errorf("concurrent %s differs from sequential", name)
	}
}
