package seismic

import (
	"math"
	"testing"
)

// FuzzParsePhase: any string either parses to a phase whose String is the
// input, or gives an error; never a panic.
func FuzzParsePhase(f *testing.F) {
	for _, s := range []string{"P", "PKIKP", "sS", "", "PKP ", "ScSScS", "\xff"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		ph, err := ParsePhase(s)
		if err != nil {
			if ph != (Phase{}) {
				t.Errorf("ParsePhase(%q) failed but returned %v", s, ph)
			}
			return
		}
		if ph.String() != s {
			t.Errorf("ParsePhase(%q).String() = %q", s, ph.String())
		}
	})
}

// FuzzArrivals: arbitrary distances and depths on a small two-layer model
// give an error or finite, ordered arrivals; never a panic or NaN.
func FuzzArrivals(f *testing.F) {
	md, err := NewMedium(twoLayer(6371e3, 3480e3, 11000, 6000, 8000), 3480e3, 0)
	if err != nil {
		f.Fatal(err)
	}
	f.Add(uint8(1), 1.0, 0.0)
	f.Add(uint8(11), 2.8, 1e5)
	f.Add(uint8(15), 0.01, 2e6)
	f.Fuzz(func(t *testing.T, id uint8, dist, depth float64) {
		a, err := md.Arrivals(nil, Phase{id: id}, dist, depth)
		if err != nil {
			return
		}
		for i, x := range a {
			if math.IsNaN(x.Time) || math.IsInf(x.Time, 0) || x.Time < 0 || (i > 0 && x.Time < a[i-1].Time) {
				t.Errorf("phase %d at %g rad, depth %g m: bad arrivals %+v", id, dist, depth, a)
			}
		}
	})
}
