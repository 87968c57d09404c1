package seismic

import (
	"math"
	"strings"
	"testing"

	"plumb/forward"
	"plumb/internal/prem"
)

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

// FindCore on PREM returns its CMB (largest density jump) and ICB (solid
// under fluid), 3480 and 1221.5 km (Dziewonski & Anderson 1981).
func TestFindCore(t *testing.T) {
	cmb, icb := FindCore(prem.MustLoad(t))
	if cmb != 3480*km || icb != 1221.5*km {
		t.Errorf("FindCore(PREM) = %g, %g m; want 3480e3, 1221.5e3", cmb, icb)
	}
	if cmb, icb := FindCore(uniform(6371e3, 8000, 4500, false)); cmb != 0 || icb != 0 {
		t.Errorf("FindCore(uniform) = %g, %g; want 0, 0", cmb, icb)
	}
	c := 3480e3
	if cmb, icb := FindCore(twoLayer(6371e3, c, 11000, 6000, 9000)); cmb != c || icb != 0 {
		t.Errorf("FindCore(two layers) = %g, %g; want %g, 0", cmb, icb, c)
	}
}
