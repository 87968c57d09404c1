package modelfile

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"plumb/forward"
)

// Column names of the file format.
const (
	ColRadius    = "radius_km"
	ColDensity   = "density_kg_m3"
	ColVp        = "vp_km_s"
	ColVs        = "vs_km_s"
	ColViscosity = "viscosity_pa_s"
	ColGravity   = "gravity_m_s2"
	ColPressure  = "pressure_pa"
)

// column describes one file column: its name, the forward.TableError column it
// feeds and the decimal shift from file units to SI.
type column struct {
	name    string
	forward string
	shift   int
}

// columnsFor returns the file columns for the optional viscosity and profile
// (gravity, pressure) columns.
func columnsFor(viscosity, profile bool) []column {
	cols := []column{
		{ColRadius, forward.ColRadius, 3},
		{ColDensity, forward.ColDensity, 0},
		{ColVp, forward.ColVp, 3},
		{ColVs, forward.ColVs, 3},
	}
	if viscosity {
		cols = append(cols, column{ColViscosity, forward.ColViscosity, 0})
	}
	if profile {
		cols = append(cols, column{ColGravity, "", 0}, column{ColPressure, "", 0})
	}
	return cols
}

// headerHelp describes the accepted headers for error messages.
const headerHelp = ColRadius + "," + ColDensity + "," + ColVp + "," + ColVs +
	", optionally followed by ," + ColViscosity + " and/or ," + ColGravity + "," + ColPressure

// table is a parsed file: SI columns plus where each row came from.
type table struct {
	forward.Table
	gravity, pressure []float64 // nil unless the file has them
	columns           []column
	lines             []int      // source line of each data row
	raw               [][]string // cell text of each data row
}

// fileError is an error located in a file; it keeps the underlying error for
// errors.As / errors.Is.
type fileError struct {
	msg string
	err error
}

func (e *fileError) Error() string { return e.msg }
func (e *fileError) Unwrap() error { return e.err }

// matchHeader returns the columns for header cells h, or nil if h is not an
// accepted header.
func matchHeader(h []string) []column {
	for _, visc := range []bool{false, true} {
		for _, prof := range []bool{false, true} {
			cols := columnsFor(visc, prof)
			if len(cols) != len(h) {
				continue
			}
			ok := true
			for i, c := range cols {
				if h[i] != c.name {
					ok = false
					break
				}
			}
			if ok {
				return cols
			}
		}
	}
	return nil
}

// readTable parses the CSV text; name is used in error messages.
func readTable(r io.Reader, name string) (*table, error) {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	var t *table
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		cells := make([]string, len(rec))
		blank := true
		for i, c := range rec {
			cells[i] = strings.TrimSpace(c)
			blank = blank && cells[i] == ""
		}
		if blank {
			continue // a line of spaces
		}
		if t == nil {
			cells[0] = strings.TrimPrefix(cells[0], "\ufeff")
			cols := matchHeader(cells)
			if cols == nil {
				return nil, fmt.Errorf("%s: line %d: header must be %s; got %q",
					name, line, headerHelp, strings.Join(cells, ","))
			}
			t = &table{columns: cols}
			if len(cols) == 5 || len(cols) == 7 {
				t.Viscosity = []float64{}
			}
			if len(cols) >= 6 {
				t.gravity, t.pressure = []float64{}, []float64{}
			}
			continue
		}
		if len(cells) != len(t.columns) {
			return nil, fmt.Errorf("%s: line %d: %d columns, but the header has %d", name, line, len(cells), len(t.columns))
		}
		vals := make([]float64, len(cells))
		for i, c := range t.columns {
			v, err := parseScaled(cells[i], c.shift)
			if err != nil {
				return nil, &fileError{
					msg: fmt.Sprintf("%s: line %d, column %s: %q %v", name, line, c.name, cells[i], err),
					err: err,
				}
			}
			vals[i] = v
		}
		t.Radius = append(t.Radius, vals[0])
		t.Density = append(t.Density, vals[1])
		t.Vp = append(t.Vp, vals[2])
		t.Vs = append(t.Vs, vals[3])
		k := 4
		if t.Viscosity != nil {
			t.Viscosity = append(t.Viscosity, vals[k])
			k++
		}
		if t.gravity != nil {
			t.gravity = append(t.gravity, vals[k])
			t.pressure = append(t.pressure, vals[k+1])
		}
		t.lines = append(t.lines, line)
		t.raw = append(t.raw, cells)
	}
	if t == nil {
		return nil, fmt.Errorf("%s: no header line (empty file)", name)
	}
	return t, nil
}

// ReadCSV parses a tabulated model (see the package documentation for the
// format) and returns it as a forward.Model built by forward.FromTable. Errors
// name the source (name, e.g. a file path), the line and the column, e.g.
//
//	model.csv: line 7, column density_kg_m3: "abc" is not a number
func ReadCSV(r io.Reader, name string) (forward.Model, error) {
	t, err := readTable(r, name)
	if err != nil {
		return forward.Model{}, err
	}
	m, err := forward.FromTable(t.Table)
	if err == nil {
		return m, nil
	}
	var te *forward.TableError
	if !errors.As(err, &te) || te.Row < 1 || te.Row > len(t.lines) {
		return forward.Model{}, fmt.Errorf("%s: %w", name, err)
	}
	col, cell := te.Column, ""
	for i, c := range t.columns {
		if c.forward == te.Column {
			col, cell = c.name, t.raw[te.Row-1][i]
		}
	}
	msg := fmt.Sprintf("%s: line %d, column %s: value %q: %s", name, t.lines[te.Row-1], col, cell, te.Msg)
	if te.Other >= 1 && te.Other <= len(t.lines) {
		msg += fmt.Sprintf(" (see line %d)", t.lines[te.Other-1])
	}
	return forward.Model{}, &fileError{msg: msg, err: err}
}

// ReadCSVFile reads a model file with ReadCSV; the path is used in errors.
func ReadCSVFile(path string) (forward.Model, error) {
	f, err := os.Open(path)
	if err != nil {
		return forward.Model{}, fmt.Errorf("model file: %w", err)
	}
	defer f.Close()
	return ReadCSV(f, path)
}

// WriteProfileCSV writes a profile as a model file with the two extra columns
// gravity_m_s2,pressure_pa. Numbers are written so that ReadCSV reads them
// back exactly. All columns must have the same length and finite values.
func WriteProfileCSV(w io.Writer, p forward.Profile) error {
	cols := [...][]float64{p.Radius, p.Density, p.Vp, p.Vs, p.Gravity, p.Pressure}
	shifts := [...]int{3, 0, 3, 3, 0, 0}
	names := [...]string{ColRadius, ColDensity, ColVp, ColVs, ColGravity, ColPressure}
	n := len(p.Radius)
	for i, c := range cols {
		if len(c) != n {
			return fmt.Errorf("write profile: column %s has %d values, %s has %d", names[i], len(c), names[0], n)
		}
	}
	bw := bufio.NewWriter(w)
	bw.WriteString(strings.Join(names[:], ",") + "\n")
	for row := range n {
		for i, c := range cols {
			v := c[row]
			if v-v != 0 { // NaN or ±Inf
				return fmt.Errorf("write profile: row %d, column %s: value %g is not finite", row+1, names[i], v)
			}
			if i > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(formatScaled(v, shifts[i]))
		}
		bw.WriteByte('\n')
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("write profile: %w", err)
	}
	return nil
}
