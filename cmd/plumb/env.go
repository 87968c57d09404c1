package main

import (
	"os"
	"strings"

	"plumb/inversion/problem"
)

// envPrefix starts the environment variables that override config keys.
const envPrefix = "PLUMB_"

// envName is the environment variable of a config key path: PLUMB_ + the path upper-cased with
// dots as underscores ("sampler.seed" → PLUMB_SAMPLER_SEED).
func envName(key string) string {
	return envPrefix + strings.ToUpper(strings.ReplaceAll(key, ".", "_"))
}

// envOverrides returns the config overrides set in the environment (lookup is os.LookupEnv in
// the CLI): one per key with a default (problem.DefaultKeys, the sampler and output keys), and
// the names of the variables used, sorted. Values are the variables' text; the strict config
// decoding converts them (and names the key when one does not fit).
func envOverrides(lookup func(string) (string, bool)) (map[string]any, []string) {
	ov := map[string]any{}
	var names []string
	for _, k := range problem.DefaultKeys() {
		if v, ok := lookup(envName(k)); ok {
			ov[k] = v
			names = append(names, envName(k))
		}
	}
	return ov, names
}

// configOverrides merges the environment's overrides with the flags' (flags win).
func configOverrides(flags map[string]any) map[string]any {
	ov, _ := envOverrides(os.LookupEnv)
	for k, v := range flags {
		ov[k] = v
	}
	return ov
}
