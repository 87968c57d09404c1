package main

import (
	"fmt"
	"math"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"plumb/forward"
	"plumb/forward/seismic"
)

// travelTimeFlags are plumb forward's travel-time options.
type travelTimeFlags struct {
	phases       []string
	distancesDeg []float64
	depthKm      float64
	cmbKm, icbKm float64
}

func (t *travelTimeFlags) register(f *pflag.FlagSet) {
	f.StringSliceVar(&t.phases, "phases", nil, "seismic phases (IASPEI names, e.g. P,S,ScS,SKS,PKIKP): adds their travel times")
	f.Float64SliceVar(&t.distancesDeg, "distances-deg", nil, "epicentral distances in degrees for --phases")
	f.Float64Var(&t.depthKm, "depth-km", 0, "source depth in km for --phases")
	f.Float64Var(&t.cmbKm, "cmb-radius-km", 0, "core–mantle boundary radius in km (default: the boundary with the largest density jump)")
	f.Float64Var(&t.icbKm, "icb-radius-km", 0, "inner-core boundary radius in km, 0 for none (default: a solid layer under a liquid one inside the core)")
}

// compute returns the core boundaries used and the arrivals of every phase at every distance.
func (t *travelTimeFlags) compute(cmd *cobra.Command, st *forward.Structure) (*coreJSON, []travelTimeJSON, error) {
	bad := func(format string, a ...any) error { return usageError{fmt.Errorf("forward: "+format, a...)} }
	if len(t.distancesDeg) == 0 {
		return nil, nil, bad("--phases needs --distances-deg")
	}
	phases := make([]seismic.Phase, len(t.phases))
	for i, name := range t.phases {
		ph, err := seismic.ParsePhase(name)
		if err != nil {
			return nil, nil, bad("--phases: %v", err)
		}
		phases[i] = ph
	}
	for _, d := range t.distancesDeg {
		if !(d >= 0 && d <= 180) {
			return nil, nil, bad("--distances-deg: %g is not in [0, 180]", d)
		}
	}
	cmb, icb := seismic.FindCore(st.Model)
	if cmd.Flags().Changed("cmb-radius-km") {
		cmb = t.cmbKm * 1e3
	}
	if cmd.Flags().Changed("icb-radius-km") {
		icb = t.icbKm * 1e3
	}
	md, err := seismic.NewMedium(st.Model, cmb, icb)
	if err != nil {
		return nil, nil, bad("travel times: %v", err)
	}
	depth := t.depthKm * 1e3
	var out []travelTimeJSON
	var buf []seismic.Arrival
	for _, ph := range phases {
		for _, d := range t.distancesDeg {
			buf, err = md.Arrivals(buf[:0], ph, d*math.Pi/180, depth)
			if err != nil {
				return nil, nil, bad("%s at %g°, depth %g km: %v", ph, d, t.depthKm, err)
			}
			r := travelTimeJSON{Phase: ph.String(), DistanceDeg: d, SourceDepthKm: t.depthKm, Arrivals: []arrivalJSON{}}
			for _, a := range buf {
				r.Arrivals = append(r.Arrivals, arrivalJSON{TimeS: a.Time, RayParameterSPerDeg: a.RayParam * math.Pi / 180,
					First: a.First, MajorArc: a.MajorArc, BottomRadiusKm: a.Bottom / 1e3})
			}
			out = append(out, r)
		}
	}
	return &coreJSON{CMBRadiusKm: cmb / 1e3, ICBRadiusKm: icb / 1e3}, out, nil
}
