package main

import (
	"reflect"
	"testing"
)

// envOverrides maps PLUMB_SECTION_KEY variables onto the key paths that have defaults, and only
// those: another PLUMB_ variable (a test switch, a key without a default) is not a config value.
func TestEnvOverrides(t *testing.T) {
	env := map[string]string{
		"PLUMB_SAMPLER_SEED":                   "7",
		"PLUMB_SAMPLER_WARMUP_STEPS":           "300",
		"PLUMB_OUTPUT_PROFILES_RADIUS_STEP_KM": "25",
		"PLUMB_REQUIRE_DUCKDB":                 "1",
		"PLUMB_PLANET_RADIUS_KM":               "3000",
	}
	lookup := func(k string) (string, bool) { v, ok := env[k]; return v, ok }
	ov, names := envOverrides(lookup)
	want := map[string]any{"sampler.seed": "7", "sampler.warmup_steps": "300", "output.profiles.radius_step_km": "25"}
	if !reflect.DeepEqual(ov, want) {
		t.Errorf("overrides %v, want %v", ov, want)
	}
	wantNames := []string{"PLUMB_OUTPUT_PROFILES_RADIUS_STEP_KM", "PLUMB_SAMPLER_SEED", "PLUMB_SAMPLER_WARMUP_STEPS"}
	if !reflect.DeepEqual(names, wantNames) {
		t.Errorf("names %v, want %v", names, wantNames)
	}
}
