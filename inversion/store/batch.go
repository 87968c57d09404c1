package store

import (
	"errors"
	"fmt"
	"unicode/utf8"
)

// Kind is the element type of a column.
type Kind int

// The column kinds. Their Parquet physical types are DOUBLE, INT64 and
// BYTE_ARRAY with the STRING logical type, respectively.
const (
	Float64 Kind = iota
	Int64
	String
)

// String returns the lower-case name of the kind ("float64", "int64",
// "string"), or "kind(N)" for an invalid value.
func (k Kind) String() string {
	switch k {
	case Float64:
		return "float64"
	case Int64:
		return "int64"
	case String:
		return "string"
	}
	return fmt.Sprintf("kind(%d)", int(k))
}

func (k Kind) valid() bool { return k == Float64 || k == Int64 || k == String }

// Column describes one column of a Batch. Unit is free text (for example
// "m" or "kg m^-3") and may be empty.
type Column struct {
	Name string
	Kind Kind
	Unit string
}

// Batch is columnar data: Data[i] is a []float64, []int64 or []string that
// matches Columns[i].Kind, and all Data slices have the same length.
// Column names are non-empty and unique.
type Batch struct {
	Columns []Column
	Data    []any
}

// NewBatch returns an empty batch with the given columns, each data slice
// having room for capacity rows. It returns an error if the columns are
// invalid (empty or duplicate name, unknown kind).
func NewBatch(cols []Column, capacity int) (*Batch, error) {
	if capacity < 0 {
		capacity = 0
	}
	b := &Batch{Columns: append([]Column(nil), cols...), Data: make([]any, len(cols))}
	for i, c := range cols {
		switch c.Kind {
		case Float64:
			b.Data[i] = make([]float64, 0, capacity)
		case Int64:
			b.Data[i] = make([]int64, 0, capacity)
		case String:
			b.Data[i] = make([]string, 0, capacity)
		}
	}
	if err := b.Validate(); err != nil {
		return nil, err
	}
	return b, nil
}

// Len returns the number of rows: the length of the first column's data, or
// 0 for a batch without columns. It does not check the other columns; see
// Validate.
func (b *Batch) Len() int {
	if b == nil || len(b.Data) == 0 {
		return 0
	}
	return dataLen(b.Data[0])
}

// dataLen returns the length of a column data slice, or -1 if d is not one
// of the supported slice types.
func dataLen(d any) int {
	switch v := d.(type) {
	case []float64:
		return len(v)
	case []int64:
		return len(v)
	case []string:
		return len(v)
	}
	return -1
}

// Validate checks the batch invariants: as many data slices as columns,
// non-empty unique names, valid kinds, data types matching the kinds, equal
// lengths and valid UTF-8 in string columns. The error names the offending
// column.
func (b *Batch) Validate() error { return b.validate(true) }

// validate checks the batch invariants; the UTF-8 scan of string columns is
// done only if checkUTF8 is set.
func (b *Batch) validate(checkUTF8 bool) error {
	if b == nil {
		return errors.New("store: nil batch")
	}
	if len(b.Columns) != len(b.Data) {
		return fmt.Errorf("store: batch has %d columns but %d data slices", len(b.Columns), len(b.Data))
	}
	seen := make(map[string]bool, len(b.Columns))
	n := -1
	for i, c := range b.Columns {
		if c.Name == "" {
			return fmt.Errorf("store: column %d has an empty name", i)
		}
		if seen[c.Name] {
			return fmt.Errorf("store: duplicate column name %q", c.Name)
		}
		seen[c.Name] = true
		if !c.Kind.valid() {
			return fmt.Errorf("store: column %q has invalid kind %v", c.Name, c.Kind)
		}
		if got := kindOf(b.Data[i]); got != c.Kind {
			return fmt.Errorf("store: column %q is declared %v but its data is %s", c.Name, c.Kind, typeName(b.Data[i]))
		}
		l := dataLen(b.Data[i])
		if n < 0 {
			n = l
		} else if l != n {
			return fmt.Errorf("store: column %q has %d rows, column %q has %d", c.Name, l, b.Columns[0].Name, n)
		}
		if s, ok := b.Data[i].([]string); ok && checkUTF8 {
			for r, v := range s {
				if !utf8.ValidString(v) {
					return fmt.Errorf("store: column %q row %d is not valid UTF-8", c.Name, r)
				}
			}
		}
	}
	return nil
}

// kindOf returns the Kind matching the slice type of d, or -1.
func kindOf(d any) Kind {
	switch d.(type) {
	case []float64:
		return Float64
	case []int64:
		return Int64
	case []string:
		return String
	}
	return -1
}

func typeName(d any) string {
	if d == nil {
		return "nil"
	}
	return fmt.Sprintf("%T", d)
}

// index returns the position of the column called name, or -1.
func (b *Batch) index(name string) int {
	if b == nil {
		return -1
	}
	for i, c := range b.Columns {
		if c.Name == name {
			return i
		}
	}
	return -1
}

// Column returns the description of the column called name.
func (b *Batch) Column(name string) (Column, bool) {
	i := b.index(name)
	if i < 0 {
		return Column{}, false
	}
	return b.Columns[i], true
}

// Float64 returns the data of the float64 column called name (not a copy).
// ok is false if there is no such column or it has another kind.
func (b *Batch) Float64(name string) ([]float64, bool) {
	i := b.index(name)
	if i < 0 {
		return nil, false
	}
	v, ok := b.Data[i].([]float64)
	return v, ok
}

// Int64 returns the data of the int64 column called name (not a copy).
// ok is false if there is no such column or it has another kind.
func (b *Batch) Int64(name string) ([]int64, bool) {
	i := b.index(name)
	if i < 0 {
		return nil, false
	}
	v, ok := b.Data[i].([]int64)
	return v, ok
}

// String returns the data of the string column called name (not a copy).
// ok is false if there is no such column or it has another kind.
func (b *Batch) String(name string) ([]string, bool) {
	i := b.index(name)
	if i < 0 {
		return nil, false
	}
	v, ok := b.Data[i].([]string)
	return v, ok
}

// sameColumns reports whether a and b describe the same columns (name, kind
// and unit) in the same order; if not, the error says where they differ.
func sameColumns(a, b []Column) error {
	if len(a) != len(b) {
		return fmt.Errorf("%d columns vs %d", len(a), len(b))
	}
	for i := range a {
		if a[i] != b[i] {
			return fmt.Errorf("column %d is %s vs %s", i, describe(a[i]), describe(b[i]))
		}
	}
	return nil
}

func describe(c Column) string {
	if c.Unit == "" {
		return fmt.Sprintf("%q (%v)", c.Name, c.Kind)
	}
	return fmt.Sprintf("%q (%v, unit %q)", c.Name, c.Kind, c.Unit)
}

// Append appends the rows of o to b. Both batches must be valid and have the
// same columns (name, kind and unit) in the same order; as a special case, a
// batch without columns takes o's columns and a copy of its data. o is not
// modified.
func (b *Batch) Append(o *Batch) error {
	if b == nil {
		return errors.New("store: append to nil batch")
	}
	if err := o.validate(false); err != nil {
		return fmt.Errorf("store: append: appended batch: %w", err)
	}
	if len(b.Columns) == 0 && len(b.Data) == 0 {
		b.Columns = append([]Column(nil), o.Columns...)
		b.Data = make([]any, len(o.Data))
		for i, d := range o.Data {
			switch v := d.(type) {
			case []float64:
				b.Data[i] = append([]float64(nil), v...)
			case []int64:
				b.Data[i] = append([]int64(nil), v...)
			case []string:
				b.Data[i] = append([]string(nil), v...)
			}
		}
		return nil
	}
	if err := b.validate(false); err != nil {
		return fmt.Errorf("store: append: receiving batch: %w", err)
	}
	if err := sameColumns(b.Columns, o.Columns); err != nil {
		return fmt.Errorf("store: append: columns differ: %w", err)
	}
	for i, d := range o.Data {
		switch v := d.(type) {
		case []float64:
			b.Data[i] = append(b.Data[i].([]float64), v...)
		case []int64:
			b.Data[i] = append(b.Data[i].([]int64), v...)
		case []string:
			b.Data[i] = append(b.Data[i].([]string), v...)
		}
	}
	return nil
}
