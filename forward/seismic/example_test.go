package seismic_test

import (
	"fmt"
	"math"

	"plumb/forward"
	"plumb/forward/seismic"
)

// P, PcP, ScS and PKP at 40° and 170° in a uniform mantle over a slower
// liquid core: P is a chord (2R sin(Δ/2)/v = 396.18 s at 40°), P is in the
// core shadow at 170°, and PKP has two branches there.
func ExampleMedium_Arrivals() {
	m := forward.Model{Layers: []forward.Layer{
		{Name: "core", Inner: 0, Outer: 3480e3, Density: forward.Const(10900), Vp: forward.Const(9000), Fluid: true},
		{Name: "mantle", Inner: 3480e3, Outer: 6371e3, Density: forward.Const(4500), Vp: forward.Const(11000), Vs: forward.Const(6000)},
	}}
	cmb, icb := seismic.FindCore(m)
	md, err := seismic.NewMedium(m, cmb, icb)
	if err != nil {
		fmt.Println(err)
		return
	}
	var buf []seismic.Arrival
	for _, name := range []string{"P", "PcP", "ScS", "PKP"} {
		ph, err := seismic.ParsePhase(name)
		if err != nil {
			fmt.Println(err)
			return
		}
		for _, deg := range []float64{40, 170} {
			buf, err = md.Arrivals(buf[:0], ph, deg*math.Pi/180, 0)
			if err != nil {
				fmt.Println(err)
				return
			}
			for _, a := range buf {
				fmt.Printf("%-4s %3.0f°: %7.2f s, p = %5.2f s/°, major arc %v\n", ph, deg, a.Time, a.RayParam*math.Pi/180, a.MajorArc)
			}
		}
	}
	// Output:
	// P     40°:  396.18 s, p =  9.50 s/°, major arc false
	// PcP   40°:  603.90 s, p =  3.62 s/°, major arc false
	// ScS   40°: 1107.15 s, p =  6.64 s/°, major arc false
	// PKP  170°: 1292.33 s, p =  1.33 s/°, major arc false
	// PKP  170°: 1337.99 s, p =  5.47 s/°, major arc false
}
