package forward

import (
	"fmt"
)

// Table is a tabulated model in SI units (m, kg/m³, m/s, Pa·s). Rows run from
// the centre (Radius 0) to the surface; properties are linear in radius between
// rows, and a discontinuity is two consecutive rows at the same radius (value
// below, then value above). Viscosity is optional: a nil slice means none.
type Table struct {
	Radius, Density, Vp, Vs, Viscosity []float64
}

// Column names used in TableError.
const (
	ColRadius    = "radius"
	ColDensity   = "density"
	ColVp        = "vp"
	ColVs        = "vs"
	ColViscosity = "viscosity"
)

// TableError reports a problem with a Table. Row is the 1-based data row (0
// if the problem concerns the table as a whole), Column one of the Col* names
// and Value the offending value (SI) when Row > 0, Other a second 1-based row
// involved in the problem (0 if none), and Msg a unit-free description, so
// that callers reading files can re-word the location in their own terms.
type TableError struct {
	Row    int
	Column string
	Value  float64
	Other  int
	Msg    string
}

// Error formats the error with the row, column and value.
func (e *TableError) Error() string {
	s := ""
	if e.Row > 0 {
		s = fmt.Sprintf("row %d, column %s, value %g: ", e.Row, e.Column, e.Value)
	}
	s += e.Msg
	if e.Other > 0 {
		s += fmt.Sprintf(" (see row %d)", e.Other)
	}
	return s
}

// FromTable builds a model from a table. Each interval between consecutive
// rows with distinct radii becomes one Layer named "rows i-j" with Linear
// density, vp and vs; an interval with vs = 0 at both ends is Fluid. With
// viscosities given, a layer's viscosity is the mean of its two end values
// (the mean of the linear profile the table describes).
//
// Row problems are reported as *TableError: fewer than 2 rows, first radius not
// 0, radius decreasing, three rows at one radius, a repeated radius at the
// centre or at the surface, non-finite values, density ≤ 0, vp ≤ 0, vs < 0 or
// viscosity < 0. The resulting model is validated before it is returned.
func FromTable(t Table) (Model, error) {
	n := len(t.Radius)
	if len(t.Density) != n || len(t.Vp) != n || len(t.Vs) != n || (t.Viscosity != nil && len(t.Viscosity) != n) {
		return Model{}, &TableError{Msg: fmt.Sprintf(
			"columns differ in length: radius %d, density %d, vp %d, vs %d, viscosity %d",
			n, len(t.Density), len(t.Vp), len(t.Vs), len(t.Viscosity))}
	}
	if n < 2 {
		return Model{}, &TableError{Msg: fmt.Sprintf("need at least 2 rows, got %d", n)}
	}
	for i := range n {
		if err := checkRow(t, i); err != nil {
			return Model{}, err
		}
	}
	if t.Radius[n-1] == t.Radius[n-2] {
		return Model{}, &TableError{Row: n, Column: ColRadius, Value: t.Radius[n-1], Other: n - 1,
			Msg: "table ends with a repeated radius (a discontinuity needs a layer above it)"}
	}
	layers := make([]Layer, 0, n-1)
	for i := 0; i+1 < n; i++ {
		r0, r1 := t.Radius[i], t.Radius[i+1]
		if r1 == r0 {
			continue
		}
		l := Layer{
			Name:    fmt.Sprintf("rows %d-%d", i+1, i+2),
			Inner:   r0,
			Outer:   r1,
			Density: Linear(r0, t.Density[i], r1, t.Density[i+1]),
			Vp:      Linear(r0, t.Vp[i], r1, t.Vp[i+1]),
			Vs:      Linear(r0, t.Vs[i], r1, t.Vs[i+1]),
			Fluid:   t.Vs[i] == 0 && t.Vs[i+1] == 0,
		}
		if t.Viscosity != nil {
			l.Viscosity = 0.5*t.Viscosity[i] + 0.5*t.Viscosity[i+1]
		}
		layers = append(layers, l)
	}
	m := Model{Layers: layers}
	if err := m.Validate(); err != nil {
		return Model{}, fmt.Errorf("table gives an invalid model: %w", err)
	}
	return m, nil
}

// checkRow checks row i (0-based) of t against itself and the rows before it.
func checkRow(t Table, i int) error {
	row := i + 1
	bad := func(col string, v float64, other int, msg string) error {
		return &TableError{Row: row, Column: col, Value: v, Other: other, Msg: msg}
	}
	cells := [...]struct {
		col string
		v   float64
	}{
		{ColRadius, t.Radius[i]}, {ColDensity, t.Density[i]}, {ColVp, t.Vp[i]}, {ColVs, t.Vs[i]},
	}
	for _, c := range cells {
		if !finite(c.v) {
			return bad(c.col, c.v, 0, "value is not finite")
		}
	}
	if t.Viscosity != nil && !finite(t.Viscosity[i]) {
		return bad(ColViscosity, t.Viscosity[i], 0, "value is not finite")
	}
	r := t.Radius[i]
	switch {
	case i == 0 && r != 0:
		return bad(ColRadius, r, 0, "first radius must be 0 (the centre)")
	case i > 0 && r < t.Radius[i-1]:
		return bad(ColRadius, r, i, "radius is less than on the previous row; radii must not decrease")
	case i == 1 && r == 0:
		return bad(ColRadius, r, 1, "repeated radius 0: no discontinuity is possible at the centre")
	case i > 1 && r == t.Radius[i-1] && r == t.Radius[i-2]:
		return bad(ColRadius, r, i-1, "three rows at one radius; a discontinuity is exactly two rows")
	}
	if !(t.Density[i] > 0) {
		return bad(ColDensity, t.Density[i], 0, "density must be > 0")
	}
	if !(t.Vp[i] > 0) {
		return bad(ColVp, t.Vp[i], 0, "vp must be > 0")
	}
	if t.Vs[i] < 0 {
		return bad(ColVs, t.Vs[i], 0, "vs must be ≥ 0")
	}
	if t.Viscosity != nil && t.Viscosity[i] < 0 {
		return bad(ColViscosity, t.Viscosity[i], 0, "viscosity must be ≥ 0")
	}
	return nil
}
