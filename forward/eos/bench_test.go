package eos

import "testing"

// benchPressures are 64 pressures spread over 0–360 GPa (Earth's centre is ≈ 364 GPa), cycled
// so that the benchmark sees the spread a hydrostatic solve sees rather than one repeated value.
func benchPressures() []float64 {
	ps := make([]float64, 64)
	for i := range ps {
		ps[i] = 360e9 * float64(i+1) / float64(len(ps))
	}
	return ps
}

var benchSink float64

func benchDensity(b *testing.B, e EOS) {
	ps := benchPressures()
	b.ReportAllocs()
	b.ResetTimer()
	s := 0.0
	for i := 0; i < b.N; i++ {
		rho, err := e.Density(ps[i&63])
		if err != nil {
			b.Fatal(err)
		}
		s += rho
	}
	benchSink = s
}

// BenchmarkDensity times Density for each EOS over 0–360 GPa (iron-like parameters; the
// BM3 K0′ < 4 case exercises the turnover bracket).
func BenchmarkDensity(b *testing.B) {
	fs, _ := NewFiniteStrainShear(120e9, 1.8)
	bm, _ := NewBM3(8269, 163.4e9, 5.38, fs)
	bmSoft, _ := NewBM3(4108, 253e9, 3.9, fs)
	vi, _ := NewVinet(8269, 163.4e9, 5.38, fs)
	co, _ := NewConstant(8269)
	b.Run("BM3", func(b *testing.B) { benchDensity(b, bm) })
	b.Run("BM3-K0p<4", func(b *testing.B) { benchDensity(b, bmSoft) })
	b.Run("Vinet", func(b *testing.B) { benchDensity(b, vi) })
	b.Run("Constant", func(b *testing.B) { benchDensity(b, co) })
}

// BenchmarkModuli times Pressure, BulkModulus, ShearModulus and Velocities at one density.
func BenchmarkModuli(b *testing.B) {
	fs, _ := NewFiniteStrainShear(120e9, 1.8)
	bm, _ := NewBM3(8269, 163.4e9, 5.38, fs)
	vi, _ := NewVinet(8269, 163.4e9, 5.38, fs)
	for _, e := range []EOS{bm, vi} {
		rho := 1.5 * e.ReferenceDensity()
		b.Run(eosName(e)+"/Pressure", func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				benchSink += e.Pressure(rho)
			}
		})
		b.Run(eosName(e)+"/BulkModulus", func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				benchSink += e.BulkModulus(rho)
			}
		})
		b.Run(eosName(e)+"/ShearModulus", func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				benchSink += e.ShearModulus(rho)
			}
		})
		b.Run(eosName(e)+"/Velocities", func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				vp, _, _ := Velocities(e, rho)
				benchSink += vp
			}
		})
	}
}

// BenchmarkDensityNear times the warm start from a guess 1e-4 (relative) off, typical of an
// iterative hydrostatic solver's later passes.
func BenchmarkDensityNear(b *testing.B) {
	fs, _ := NewFiniteStrainShear(120e9, 1.8)
	bm, _ := NewBM3(8269, 163.4e9, 5.38, fs)
	vi, _ := NewVinet(8269, 163.4e9, 5.38, fs)
	for _, e := range []EOS{bm, vi} {
		ps := benchPressures()
		guess := make([]float64, len(ps))
		for i, p := range ps {
			rho, err := e.Density(p)
			if err != nil {
				b.Fatal(err)
			}
			guess[i] = rho * (1 + 1e-4)
		}
		b.Run(eosName(e), func(b *testing.B) {
			b.ReportAllocs()
			s := 0.0
			for i := 0; i < b.N; i++ {
				rho, err := DensityNear(e, ps[i&63], guess[i&63])
				if err != nil {
					b.Fatal(err)
				}
				s += rho
			}
			benchSink = s
		})
	}
}
