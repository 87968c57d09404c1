package forward

import (
	"encoding/csv"
	"math"
	"os"
	"strconv"
	"testing"
)

// relClose reports whether got is within tol of want, relative to |want|
// (or to scale if want is 0).
func relClose(got, want, tol float64) bool {
	if want == 0 {
		return math.Abs(got) <= tol
	}
	return math.Abs(got-want) <= tol*math.Abs(want)
}

func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !relClose(got, want, tol) {
		t.Errorf("%s = %.17g, want %.17g (rel. error %.3g, tolerance %.3g)",
			what, got, want, math.Abs(got-want)/math.Abs(want), tol)
	}
}

// loadPREM builds the polynomial PREM from ../testdata/prem/prem_polynomials.csv
// (coefficients in x = r/6371 km, g/cm³ and km/s; see the README there).
func loadPREM(t testing.TB) Model {
	t.Helper()
	f, err := os.Open("../testdata/prem/prem_polynomials.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rd := csv.NewReader(f)
	rd.Comment = '#'
	recs, err := rd.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	const a = 6371e3
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	poly := func(cells []string) Poly {
		c := make([]float64, len(cells))
		for i, s := range cells {
			c[i] = 1000 * num(s) // g/cm³ → kg/m³, km/s → m/s
		}
		return Poly{C: c, Scale: a}
	}
	var m Model
	for _, r := range recs[1:] {
		m.Layers = append(m.Layers, Layer{
			Name:    r[0],
			Inner:   1000 * num(r[1]),
			Outer:   1000 * num(r[2]),
			Fluid:   r[3] == "true",
			Density: poly(r[4:8]),
			Vp:      poly(r[8:12]),
			Vs:      poly(r[12:16]),
		})
	}
	return m
}
