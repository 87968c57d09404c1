package problem

import (
	"errors"
	"strings"
	"testing"
)

// The profile grid: automatic step (largest radius / 200 rounded down to 1, 2 or 5 × 10^k km),
// a given step, the table switched off, and a step so small that the table would explode.
func TestProfileGrid(t *testing.T) {
	p := buildConfig(t, testConfig) // planet radius 3000 km
	cases := []struct {
		name     string
		pc       ProfilesConfig
		n        int
		step, hi float64 // m
		err      string
	}{
		{"automatic: 3000/200 = 15 → 10 km", ProfilesConfig{EveryDraws: 10}, 301, 10e3, 3000e3, ""},
		{"given step", ProfilesConfig{EveryDraws: 1, RadiusStepKm: 70}, 44, 70e3, 3000e3, ""},
		{"off", ProfilesConfig{EveryDraws: 0, RadiusStepKm: 70}, 0, 0, 0, ""},
		{"too fine", ProfilesConfig{EveryDraws: 1, RadiusStepKm: 0.1}, 0, 0, 0, "output.profiles.radius_step_km"},
	}
	for _, c := range cases {
		g, err := p.ProfileGrid("c.yaml", c.pc)
		if c.err != "" {
			var ce *ConfigError
			if !errors.As(err, &ce) || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%s: error %v, want a ConfigError naming %s", c.name, err, c.err)
			}
			continue
		}
		if err != nil || len(g) != c.n {
			t.Fatalf("%s: %d radii (err %v), want %d", c.name, len(g), err, c.n)
		}
		if c.n > 0 && (g[1] != c.step || g[len(g)-1] != c.hi) {
			t.Errorf("%s: step %g, top %g; want %g, %g", c.name, g[1], g[len(g)-1], c.step, c.hi)
		}
	}
	for _, c := range []struct{ in, want float64 }{{21e3, 20e3}, {15e3, 10e3}, {9.9e3, 5e3}, {1e3, 1e3}, {0.37e3, 0.2e3}} {
		if got := roundStep(c.in); got != c.want {
			t.Errorf("roundStep(%g) = %g, want %g", c.in, got, c.want)
		}
	}
}
