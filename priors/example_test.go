package priors_test

import (
	"fmt"
	"math/rand/v2"

	"plumb/priors"
)

// A space of two parameters, one with a uniform and one with a normal prior. Values are in SI
// units (metres here); ToUnit converts them to the unit in the parameter's name for output.
func ExampleSpace() {
	width, err := priors.NewUniform(1000, 3000) // m
	if err != nil {
		fmt.Println(err)
		return
	}
	offset, err := priors.NewNormal(0, 0.5) // m
	if err != nil {
		fmt.Println(err)
		return
	}
	s := priors.Space{Params: []priors.Param{
		{Name: "width_km", Unit: "km", ToUnit: 1e-3, Prior: width},
		{Name: "offset_m", Unit: "m", ToUnit: 1, Prior: offset},
	}}
	if err := s.Validate(); err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range s.Params {
		fmt.Println(p)
	}

	// Draws come from the caller's generator, so a fixed seed gives fixed draws.
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, s.Dim())
	s.Sample(r, x)
	fmt.Printf("draw: width %.1f m, offset %.4f m\n", x[0], x[1])
	fmt.Printf("log prior at the draw: %.4f\n", s.LogPrior(x))
	fmt.Printf("log prior outside the support: %v\n", s.LogPrior([]float64{500, 0}))

	// Quantiles (inverse CDFs), in SI units.
	fmt.Printf("width quartiles: %g, %g, %g m\n", width.Quantile(0.25), width.Quantile(0.5), width.Quantile(0.75))
	fmt.Printf("offset 97.5 %% quantile: %.4f m\n", offset.Quantile(0.975))
	// Output:
	// width_km ~ uniform(1, 3) km
	// offset_m ~ normal(0, 0.5) m
	// draw: width 2352.9 m, offset 0.0374 m
	// log prior at the draw: -7.8295
	// log prior outside the support: -Inf
	// width quartiles: 1500, 2000, 2500 m
	// offset 97.5 % quantile: 0.9800 m
}
