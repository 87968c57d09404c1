package store

import (
	"bytes"
	"math"
	"os"
	"slices"
	"strings"
	"testing"
)

// trickyFloats are float64 values whose bits a lossy writer or a
// text-based round trip would change.
var trickyFloats = []float64{
	0,
	math.Copysign(0, -1),                     // negative zero
	math.SmallestNonzeroFloat64,              // smallest subnormal, 2^-1074
	math.Float64frombits(0x000fffffffffffff), // largest subnormal
	-math.SmallestNonzeroFloat64,
	2.2250738585072014e-308, // smallest normal
	1e308,
	-1e308,
	math.MaxFloat64,
	0.1 + 0.2, // 0.30000000000000004, 17 significant digits
	math.Pi,
	1.0 / 3.0,
	math.Nextafter(1, 2),
	6.02214076e23,
	-1.2345678901234567e-89,
	math.Inf(1),
	math.Inf(-1),
	math.NaN(),
	math.Float64frombits(0x7ff8000000000abc), // NaN with a payload
	math.Float64frombits(0xfff0000000000001), // negative signalling NaN
}

// sampleBatch returns a batch of n rows with a float, an int and a string
// column, in non-alphabetical order, filled deterministically from seed.
func sampleBatch(n int, seed int64) *Batch {
	f := make([]float64, n)
	i := make([]int64, n)
	s := make([]string, n)
	strs := []string{"", "a", "ε-Übergang", "tab\tnew\nline", strings.Repeat("x", 300), "\x00nul"}
	ints := []int64{0, -1, 1, math.MaxInt64, math.MinInt64, 1 << 53, -(1 << 53) - 1}
	for r := range n {
		k := int(seed) + r
		if r%3 == 0 {
			f[r] = trickyFloats[k%len(trickyFloats)]
		} else {
			f[r] = float64(k)*1.000000000000001e-3 - 17
		}
		if r%5 == 0 {
			i[r] = ints[k%len(ints)]
		} else {
			i[r] = int64(k) * 7919
		}
		s[r] = strs[k%len(strs)]
	}
	return &Batch{
		Columns: []Column{
			{Name: "theta", Kind: Float64, Unit: "kg m^-3"},
			{Name: "step", Kind: Int64},
			{Name: "chain_label", Kind: String, Unit: "—"},
		},
		Data: []any{f, i, s},
	}
}

// equalBits reports whether two float slices are identical bit for bit.
func equalBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// assertSameData checks that got has exactly want's columns (by name, kind
// and unit, in any order) and bit-identical data.
func assertSameData(t *testing.T, want, got *Batch) {
	t.Helper()
	if len(got.Columns) != len(want.Columns) {
		t.Fatalf("got %d columns, want %d", len(got.Columns), len(want.Columns))
	}
	if got.Len() != want.Len() {
		t.Fatalf("got %d rows, want %d", got.Len(), want.Len())
	}
	for i, c := range want.Columns {
		gc, ok := got.Column(c.Name)
		if !ok {
			t.Fatalf("column %q missing", c.Name)
		}
		if gc != c {
			t.Errorf("column %q read back as %+v, want %+v", c.Name, gc, c)
		}
		switch w := want.Data[i].(type) {
		case []float64:
			g, ok := got.Float64(c.Name)
			if !ok || !equalBits(g, w) {
				t.Errorf("float column %q differs", c.Name)
			}
		case []int64:
			g, ok := got.Int64(c.Name)
			if !ok || !slices.Equal(g, w) {
				t.Errorf("int column %q differs", c.Name)
			}
		case []string:
			g, ok := got.String(c.Name)
			if !ok || !slices.Equal(g, w) {
				t.Errorf("string column %q differs", c.Name)
			}
		}
	}
}

// assertDir checks that dir holds exactly the named entries.
func assertDir(t *testing.T, dir string, want ...string) {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, e := range entries {
		got = append(got, e.Name())
	}
	slices.Sort(want)
	if !slices.Equal(got, want) {
		t.Errorf("directory holds %q, want %q", got, want)
	}
}

// corruptMiddle returns a copy of data with bytes in the middle flipped.
func corruptMiddle(data []byte) []byte {
	c := bytes.Clone(data)
	for i := len(c) / 3; i < len(c)/3+64 && i < len(c); i++ {
		c[i] ^= 0xa5
	}
	return c
}

func second[T any](_ T, ok bool) bool { return ok }
