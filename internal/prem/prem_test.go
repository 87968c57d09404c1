package prem

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The table of Dziewonski & Anderson (1981): 13 regions (with the ocean),
// surface radius 6371 km, vp at the top of the inner core 11.02 km/s and
// density at the top of the outer core 9.90 g/cm³ (from memory; checked to
// 0.5 %).
func TestLoad(t *testing.T) {
	m, err := Load("../../testdata/prem/prem_polynomials.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Layers) != 13 || m.Radius() != 6371e3 {
		t.Fatalf("%d layers, radius %g m; want 13, 6371e3", len(m.Layers), m.Radius())
	}
	if err := m.Validate(); err != nil {
		t.Fatal(err)
	}
	ic, oc := m.Layers[0], m.Layers[1]
	if v := ic.Vp.At(1221.5e3); math.Abs(v-11020)/11020 > 0.005 {
		t.Errorf("inner-core top vp %g m/s", v)
	}
	if rho := oc.Density.At(3480e3); math.Abs(rho-9900)/9900 > 0.005 {
		t.Errorf("outer-core top density %g kg/m³", rho)
	}
	if !oc.Fluid || ic.Fluid || !m.Layers[12].Fluid {
		t.Error("fluid flags wrong")
	}
}

func TestLoadErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o600); err != nil {
			t.Fatal(err)
		}
		return p
	}
	head := "region,inner_km,outer_km,fluid,a,b,c,d,e,f,g,h,i,j,k,l\n"
	for _, c := range []struct {
		name, path, want string
	}{
		{"missing", filepath.Join(dir, "none.csv"), "no such file"},
		{"empty", write("empty.csv", "# only a comment\n"), "no data"},
		{"short record", write("short.csv", head+"x,0,1,false,1,2\n"), "fields"},
		{"bad number", write("bad.csv", head+"x,0,1,false,1,0,0,0,1,0,0,zero,1,0,0,0\n"), "record 1"},
	} {
		_, err := Load(c.path)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
}

// WithoutOcean gives the top 3 km the upper crust's material and leaves the input untouched.
func TestWithoutOcean(t *testing.T) {
	m, err := Load("../../testdata/prem/prem_polynomials.csv")
	if err != nil {
		t.Fatal(err)
	}
	c, err := WithoutOcean(m)
	if err != nil {
		t.Fatal(err)
	}
	top, crust := c.Layers[12], c.Layers[11]
	if top.Fluid || top.Density.At(6370e3) != crust.Density.At(6370e3) || top.Vs.At(6370e3) != crust.Vs.At(6370e3) {
		t.Errorf("top layer %+v is not the crust below it", top)
	}
	if !m.Layers[12].Fluid {
		t.Error("the input model was modified")
	}
	if _, err := WithoutOcean(c); err == nil {
		t.Error("a model without an ocean gave no error")
	}
}
