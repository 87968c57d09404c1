package forward

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestFromTableErrors(t *testing.T) {
	base := func() Table {
		return Table{
			Radius:  []float64{0, 1e6, 1e6, 2e6},
			Density: []float64{9000, 8000, 4000, 3000},
			Vp:      []float64{9000, 8000, 7000, 6000},
			Vs:      []float64{0, 0, 4000, 3000},
		}
	}
	cases := []struct {
		name   string
		edit   func(t *Table)
		row    int
		column string
	}{
		{"one row", func(t *Table) {
			*t = Table{Radius: []float64{0}, Density: []float64{1}, Vp: []float64{1}, Vs: []float64{0}}
		}, 0, ""},
		{"length mismatch", func(t *Table) { t.Vp = t.Vp[:3] }, 0, ""},
		{"first radius not 0", func(t *Table) { t.Radius[0] = 5 }, 1, ColRadius},
		{"radius decreasing", func(t *Table) { t.Radius[3] = 0.5e6 }, 4, ColRadius},
		{"three rows at one radius", func(t *Table) {
			t.Radius = append(t.Radius[:3], 1e6, 2e6)
			t.Density = append(t.Density, 2000)
			t.Vp = append(t.Vp, 5000)
			t.Vs = append(t.Vs, 2000)
		}, 4, ColRadius},
		{"repeated centre", func(t *Table) { t.Radius[1] = 0 }, 2, ColRadius},
		{"ends with discontinuity", func(t *Table) { t.Radius = []float64{0, 1e6, 2e6, 2e6} }, 4, ColRadius},
		{"NaN density", func(t *Table) { t.Density[2] = math.NaN() }, 3, ColDensity},
		{"Inf vs", func(t *Table) { t.Vs[1] = math.Inf(1) }, 2, ColVs},
		{"zero density", func(t *Table) { t.Density[1] = 0 }, 2, ColDensity},
		{"negative vp", func(t *Table) { t.Vp[3] = -1 }, 4, ColVp},
		{"negative vs", func(t *Table) { t.Vs[2] = -1 }, 3, ColVs},
		{"negative viscosity", func(t *Table) { t.Viscosity = []float64{1, 1, -1, 1} }, 3, ColViscosity},
		{"viscosity wrong length", func(t *Table) { t.Viscosity = []float64{1} }, 0, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tb := base()
			c.edit(&tb)
			_, err := FromTable(tb)
			var te *TableError
			if !errors.As(err, &te) {
				t.Fatalf("error %v is not a *TableError", err)
			}
			if te.Row != c.row || te.Column != c.column {
				t.Errorf("error %q at row %d column %q, want row %d column %q", err, te.Row, te.Column, c.row, c.column)
			}
			if c.row > 0 && !strings.Contains(err.Error(), "row ") {
				t.Errorf("message %q does not name the row", err)
			}
		})
	}
}

// A piecewise-linear table must give the same model as Linear layers built by
// hand, with fluid detection and mean viscosities.
func TestFromTableEqualsLinearLayers(t *testing.T) {
	tb := Table{
		Radius:    []float64{0, 1.2e6, 1.2e6, 3.5e6, 3.5e6, 5e6, 6e6},
		Density:   []float64{13000, 12700, 12100, 9900, 5500, 4400, 3300},
		Vp:        []float64{11200, 11000, 10300, 8100, 13700, 11000, 8000},
		Vs:        []float64{3600, 3500, 0, 0, 7200, 6000, 4400},
		Viscosity: []float64{1e18, 3e18, 0.01, 0.01, 1e22, 1e21, 1e20},
	}
	m, err := FromTable(tb)
	if err != nil {
		t.Fatal(err)
	}
	want := []Layer{
		{Inner: 0, Outer: 1.2e6, Density: Linear(0, 13000, 1.2e6, 12700), Vp: Linear(0, 11200, 1.2e6, 11000), Vs: Linear(0, 3600, 1.2e6, 3500), Viscosity: 2e18},
		{Inner: 1.2e6, Outer: 3.5e6, Density: Linear(1.2e6, 12100, 3.5e6, 9900), Vp: Linear(1.2e6, 10300, 3.5e6, 8100), Vs: Linear(1.2e6, 0, 3.5e6, 0), Fluid: true, Viscosity: 0.01},
		{Inner: 3.5e6, Outer: 5e6, Density: Linear(3.5e6, 5500, 5e6, 4400), Vp: Linear(3.5e6, 13700, 5e6, 11000), Vs: Linear(3.5e6, 7200, 5e6, 6000), Viscosity: 5.5e21},
		{Inner: 5e6, Outer: 6e6, Density: Linear(5e6, 4400, 6e6, 3300), Vp: Linear(5e6, 11000, 6e6, 8000), Vs: Linear(5e6, 6000, 6e6, 4400), Viscosity: 5.5e20},
	}
	if len(m.Layers) != len(want) {
		t.Fatalf("%d layers, want %d", len(m.Layers), len(want))
	}
	for i, w := range want {
		g := m.Layers[i]
		if g.Inner != w.Inner || g.Outer != w.Outer || g.Fluid != w.Fluid || !relClose(g.Viscosity, w.Viscosity, 1e-15) ||
			!polyEqual(g.Density, w.Density) || !polyEqual(g.Vp, w.Vp) || !polyEqual(g.Vs, w.Vs) {
			t.Errorf("layer %d = %+v, want %+v", i, g, w)
		}
	}
	sa, err := Solve(m)
	if err != nil {
		t.Fatal(err)
	}
	sb, err := Solve(Model{Layers: want})
	if err != nil {
		t.Fatal(err)
	}
	if sa.Mass != sb.Mass || sa.Inertia != sb.Inertia || sa.CentralPressure() != sb.CentralPressure() {
		t.Error("solved table model differs from the hand-built one")
	}
}

func polyEqual(a, b Poly) bool {
	if a.Scale != b.Scale || len(a.C) != len(b.C) {
		return false
	}
	for i := range a.C {
		if a.C[i] != b.C[i] {
			return false
		}
	}
	return true
}

// A profile of a piecewise-linear model, fed back through FromTable, must give
// the same mass: linear interpolation of linear layers is exact (up to
// rounding). Reference: the closed form M = Σ 4π∫ρr²dr of the original model.
func TestFromTableProfileRoundTrip(t *testing.T) {
	m := Model{Layers: []Layer{
		{Inner: 0, Outer: 3e6, Density: Linear(0, 11000, 3e6, 9900), Vp: Const(9000), Vs: Const(0), Fluid: true},
		{Inner: 3e6, Outer: 6e6, Density: Linear(3e6, 5500, 6e6, 3300), Vp: Const(11000), Vs: Linear(3e6, 7000, 6e6, 4500)},
	}}
	s, err := Solve(m)
	if err != nil {
		t.Fatal(err)
	}
	p := s.Profile(5)
	m2, err := FromTable(Table{Radius: p.Radius, Density: p.Density, Vp: p.Vp, Vs: p.Vs})
	if err != nil {
		t.Fatal(err)
	}
	s2, err := Solve(m2)
	if err != nil {
		t.Fatal(err)
	}
	checkRel(t, "mass", s2.Mass, s.Mass, 1e-13)
	checkRel(t, "inertia", s2.Inertia, s.Inertia, 1e-13)
	checkRel(t, "central pressure", s2.CentralPressure(), s.CentralPressure(), 1e-13)
	if len(m2.Layers) != 8 || !m2.Layers[0].Fluid || m2.Layers[4].Fluid {
		t.Errorf("got %d layers (want 8), fluid flags %v %v", len(m2.Layers), m2.Layers[0].Fluid, m2.Layers[4].Fluid)
	}
}
