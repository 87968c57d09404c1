package forward

import (
	"math"
	"strings"
	"testing"
)

func TestSolveRejects(t *testing.T) {
	good := func() Model {
		return Model{Layers: []Layer{uniformLayer("core", 0, 3e6, 10000, true), uniformLayer("mantle", 3e6, 6e6, 4000, false)}}
	}
	cases := []struct {
		name   string
		edit   func(m *Model)
		substr string
	}{
		{"no layers", func(m *Model) { m.Layers = nil }, "no layers"},
		{"not from centre", func(m *Model) { m.Layers[0].Inner = 1 }, `layer 0 ("core")`},
		{"gap", func(m *Model) { m.Layers[1].Inner = 3.1e6 }, `layer 1 ("mantle")`},
		{"inverted", func(m *Model) { m.Layers[1].Outer = 2e6 }, "less than outer"},
		{"NaN radius", func(m *Model) { m.Layers[1].Outer = math.NaN() }, "finite"},
		{"zero density", func(m *Model) { m.Layers[1].Density = Const(0) }, "density must be > 0"},
		{"negative vp", func(m *Model) { m.Layers[0].Vp = Const(-1) }, "vp must be > 0"},
		{"negative vs", func(m *Model) { m.Layers[1].Vs = Const(-1) }, "vs must be ≥ 0"},
		{"bad scale", func(m *Model) { m.Layers[1].Density.Scale = 0 }, "scale"},
		{"Inf coefficient", func(m *Model) { m.Layers[1].Density.C = []float64{math.Inf(1)} }, "coefficient"},
		{"empty poly", func(m *Model) { m.Layers[1].Vp.C = nil }, "no coefficients"},
		{"negative viscosity", func(m *Model) { m.Layers[1].Viscosity = -1 }, "viscosity"},
		// Quadratic with positive end values that dips below zero inside.
		// The mantle spans u = r/6e6 ∈ [0.5, 1]. These polynomials are positive
		// at both ends (checked below) and negative inside.
		{"density dips inside (quadratic)", func(m *Model) {
			// 32000 (u − 0.75)² − 100: 1900 at the ends, −100 at u = 0.75.
			m.Layers[1].Density = Poly{C: []float64{17900, -48000, 32000}, Scale: 6e6}
		}, "density must be > 0"},
		{"density dips inside (cubic)", func(m *Model) {
			m.Layers[1].Density = Poly{C: cubicDip(0.5, 1, 0.7), Scale: 6e6}
		}, "density must be > 0"},
		{"vp dips inside (quintic)", func(m *Model) {
			m.Layers[1].Vp = Poly{C: append(cubicDip(0.5, 1, 0.7), 0, 1e-9), Scale: 6e6}
		}, "vp must be > 0"},
		{"overflow", func(m *Model) {
			for i := range m.Layers {
				m.Layers[i].Inner *= 1e70
				m.Layers[i].Outer *= 1e70
			}
		}, "numerical range"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := good()
			c.edit(&m)
			if strings.Contains(c.name, "inside") {
				l := m.Layers[1]
				for _, r := range []float64{l.Inner, l.Outer} {
					if l.Density.At(r) <= 0 || l.Vp.At(r) <= 0 {
						t.Fatalf("test polynomial not positive at the end r = %g", r)
					}
				}
			}
			_, err := Solve(m)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.substr) {
				t.Errorf("error %q does not mention %q", err, c.substr)
			}
		})
	}
	// Fluid layers ignore vs entirely.
	m := good()
	m.Layers[0].Vs = Const(-5)
	if _, err := Solve(m); err != nil {
		t.Errorf("fluid layer with negative vs rejected: %v", err)
	}
}

// cubicDip returns the coefficients (in u) of a cubic that is 500 at u = lo and
// u = hi but −1000 at u = mid; the dip is only visible inside.
func cubicDip(lo, hi, mid float64) []float64 {
	// p(u) = 500 + k (u − lo)(u − hi)(u − 2) with k chosen so p(mid) = −1000.
	k := -1500 / ((mid - lo) * (mid - hi) * (mid - 2))
	// Expand (u − lo)(u − hi)(u − 2) = u³ − s1 u² + s2 u − s3.
	s1 := lo + hi + 2
	s2 := lo*hi + 2*lo + 2*hi
	s3 := 2 * lo * hi
	return []float64{500 - k*s3, k * s2, -k * s1, k}
}
