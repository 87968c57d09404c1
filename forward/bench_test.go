package forward

import "testing"

func fourLayer() Model {
	return Model{Layers: []Layer{
		{Name: "inner core", Inner: 0, Outer: 1.2e6, Density: Poly{C: []float64{13088, 0, -8838}, Scale: 6.371e6}, Vp: Const(11000), Vs: Const(3500)},
		{Name: "outer core", Inner: 1.2e6, Outer: 3.48e6, Density: Linear(1.2e6, 12170, 3.48e6, 9900), Vp: Const(9000), Fluid: true},
		{Name: "mantle", Inner: 3.48e6, Outer: 6.346e6, Density: Linear(3.48e6, 5570, 6.346e6, 3380), Vp: Const(11000), Vs: Const(6000)},
		{Name: "crust", Inner: 6.346e6, Outer: 6.371e6, Density: Const(2800), Vp: Const(6500), Vs: Const(3700)},
	}}
}

func BenchmarkSolve(b *testing.B) {
	for _, c := range []struct {
		name string
		m    Model
	}{{"4layer", fourLayer()}, {"PREM", loadPREM(b)}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Solve(c.m); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkValidate(b *testing.B) {
	m := loadPREM(b)
	b.ReportAllocs()
	for b.Loop() {
		if err := m.Validate(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkPressure(b *testing.B) {
	s, err := Solve(loadPREM(b))
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		_ = s.Pressure(4.2e6)
	}
}

func BenchmarkProfile(b *testing.B) {
	s, err := Solve(loadPREM(b))
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		_ = s.Profile(50)
	}
}
