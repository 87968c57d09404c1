package seismic

import (
	"math"
	"sort"
	"strings"
	"sync"
	"testing"

	"plumb/forward"
)

func TestParsePhase(t *testing.T) {
	for _, name := range []string{"P", "S", "PP", "SS", "PcP", "ScS", "ScP", "PcS", "SKS", "SKKS", "PKP", "PKIKP", "pP", "sS", "p", "s"} {
		ph, err := ParsePhase(name)
		if err != nil {
			t.Errorf("ParsePhase(%q): %v", name, err)
			continue
		}
		if ph.String() != name {
			t.Errorf("ParsePhase(%q).String() = %q", name, ph.String())
		}
	}
	for _, name := range []string{"", "X", "pp", "P ", " P", "Pdiff", "PKiKP", "PKIKP2", "pS", "SKP", "p\x00", "ＰcP"} {
		_, err := ParsePhase(name)
		if err == nil {
			t.Errorf("ParsePhase(%q): no error", name)
			continue
		}
		if !strings.Contains(err.Error(), "unknown phase") {
			t.Errorf("ParsePhase(%q): error %q does not say what is wrong", name, err)
		}
	}
	if (Phase{}).String() != "" {
		t.Errorf("zero Phase String() = %q", Phase{}.String())
	}
}

func TestNewMediumErrors(t *testing.T) {
	const R = 6371e3
	good := twoLayer(R, 3480e3, 11000, 6000, 8000)
	nan := math.NaN()
	for _, c := range []struct {
		name     string
		m        forward.Model
		cmb, icb float64
		want     string
	}{
		{"empty model", forward.Model{}, 0, 0, "invalid model"},
		{"bad layer", forward.Model{Layers: []forward.Layer{{Inner: 0, Outer: R, Density: forward.Const(3000), Vp: forward.Const(-1)}}}, 0, 0, "invalid model"},
		{"cmb at surface", good, R, 0, "core–mantle boundary"},
		{"cmb above surface", good, 2 * R, 0, "core–mantle boundary"},
		{"cmb negative", good, -1, 0, "core–mantle boundary"},
		{"cmb NaN", good, nan, 0, "finite"},
		{"icb Inf", good, 3480e3, math.Inf(1), "finite"},
		{"icb at cmb", good, 3480e3, 3480e3, "inner-core boundary"},
		{"icb above cmb", good, 3480e3, 4000e3, "inner-core boundary"},
		{"icb negative", good, 3480e3, -5, "inner-core boundary"},
		{"icb without core", good, 0, 1000e3, "inner-core boundary"},
	} {
		_, err := NewMedium(c.m, c.cmb, c.icb)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
	for _, h := range []float64{0, -1, nan, math.Inf(1)} {
		if _, err := NewMediumShells(good, 3480e3, 0, h); err == nil || !strings.Contains(err.Error(), "thickness") {
			t.Errorf("maxShell %g: error %v", h, err)
		}
	}
	n := func(r, vp, vs float64) Node { return Node{R: r, Vp: vp, Vs: vs} }
	for _, c := range []struct {
		name  string
		nodes []Node
		want  string
	}{
		{"one node", []Node{n(0, 1, 1)}, "at least 2"},
		{"not from centre", []Node{n(1, 1, 1), n(R, 1, 1)}, "r = 0"},
		{"decreasing", []Node{n(0, 1, 1), n(R, 1, 1), n(R/2, 1, 1)}, "below the previous"},
		{"three at one radius", []Node{n(0, 1, 1), n(R/2, 1, 1), n(R/2, 2, 1), n(R/2, 3, 1), n(R, 1, 1)}, "more than two"},
		{"vp zero", []Node{n(0, 1, 1), n(R, 0, 1)}, "vp > 0"},
		{"vs negative", []Node{n(0, 1, 1), n(R, 1, -1)}, "vs ≥ 0"},
		{"NaN", []Node{n(0, 1, 1), n(R, nan, 1)}, "non-finite"},
		{"surface discontinuity", []Node{n(0, 1, 1), n(R, 1, 1), n(R, 2, 1)}, "surface"},
	} {
		_, err := NewMediumNodes(c.nodes, 0, 0)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("NewMediumNodes %s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
}

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
