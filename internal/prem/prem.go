// Package prem is test support: it reads the polynomial PREM table in
// testdata/prem/prem_polynomials.csv (format in testdata/prem/README.md) into a
// forward.Model, so that tests of several packages share one loader.
//
// The logic is that of the loader in forward/tides' tests: every property is
// c0 + c1 x + c2 x² + c3 x³ in x = r / 6371 km, given in g/cm³ and km/s and
// converted to SI (kg/m³, m/s) by a factor 1000, with Scale = 6371e3 m; radii
// are given in km. It is not meant for production input: errors name the
// record but there is no schema versioning.
package prem

import (
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"testing"

	"plumb/forward"
)

// Radius is the PREM surface radius used as the polynomial scale (m).
const Radius = 6371e3

// Load reads the PREM CSV at path and returns the model, layers from the
// centre out. Lines starting with '#' are comments; the first record is the
// header. Each record needs 16 fields: region, inner_km, outer_km, fluid
// ("true" or anything else), then c0..c3 for density, vp and vs.
func Load(path string) (forward.Model, error) {
	f, err := os.Open(path)
	if err != nil {
		return forward.Model{}, fmt.Errorf("prem: %w", err)
	}
	defer f.Close()
	rd := csv.NewReader(f)
	rd.Comment = '#'
	recs, err := rd.ReadAll()
	if err != nil {
		return forward.Model{}, fmt.Errorf("prem: %s: %w", path, err)
	}
	if len(recs) < 2 {
		return forward.Model{}, fmt.Errorf("prem: %s: no data records", path)
	}
	var m forward.Model
	for i, r := range recs[1:] {
		if len(r) != 16 {
			return forward.Model{}, fmt.Errorf("prem: %s: record %d has %d fields, want 16", path, i+1, len(r))
		}
		var bad error
		num := func(s string) float64 {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil && bad == nil {
				bad = err
			}
			return v
		}
		poly := func(cells []string) forward.Poly {
			c := make([]float64, len(cells))
			for k, s := range cells {
				c[k] = 1000 * num(s) // g/cm³ → kg/m³, km/s → m/s
			}
			return forward.Poly{C: c, Scale: Radius}
		}
		l := forward.Layer{
			Name:    r[0],
			Inner:   1000 * num(r[1]),
			Outer:   1000 * num(r[2]),
			Fluid:   r[3] == "true",
			Density: poly(r[4:8]),
			Vp:      poly(r[8:12]),
			Vs:      poly(r[12:16]),
		}
		if bad != nil {
			return forward.Model{}, fmt.Errorf("prem: %s: record %d (%q): %w", path, i+1, r[0], bad)
		}
		m.Layers = append(m.Layers, l)
	}
	return m, nil
}

// WithoutOcean returns a copy of m whose outermost layer — a fluid, PREM's 3 km ocean — is
// replaced by the material of the layer below it (usual for solid-Earth Love numbers, and needed
// for S waves to reach a surface receiver; common practice, no source). The layers are copied;
// their polynomials are shared.
func WithoutOcean(m forward.Model) (forward.Model, error) {
	n := len(m.Layers)
	if n < 2 || !m.Layers[n-1].Fluid {
		return forward.Model{}, fmt.Errorf("prem: the outermost layer is not a fluid ocean")
	}
	m.Layers = append([]forward.Layer(nil), m.Layers...)
	top, below := &m.Layers[n-1], m.Layers[n-2]
	top.Fluid, top.Density, top.Vp, top.Vs = false, below.Density, below.Vp, below.Vs
	return m, nil
}

// File returns the path of the shared table, testdata/prem/prem_polynomials.csv at the module
// root, located from this source file so that tests in any package find it.
func File() string {
	_, self, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(self), "..", "..", "testdata", "prem", "prem_polynomials.csv")
}

// MustLoad loads the shared table (File) and fails the test on error.
func MustLoad(tb testing.TB) forward.Model {
	tb.Helper()
	m, err := Load(File())
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// MustLoadWithoutOcean is MustLoad followed by WithoutOcean.
func MustLoadWithoutOcean(tb testing.TB) forward.Model {
	tb.Helper()
	m, err := WithoutOcean(MustLoad(tb))
	if err != nil {
		tb.Fatal(err)
	}
	return m
}
