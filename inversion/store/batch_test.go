package store

import (
	"slices"
	"strings"
	"testing"
)

func TestBatchAccessors(t *testing.T) {
	b := &Batch{
		Columns: []Column{{Name: "f", Kind: Float64, Unit: "m"}, {Name: "i", Kind: Int64}, {Name: "s", Kind: String}},
		Data:    []any{[]float64{1, 2}, []int64{3, 4}, []string{"x", "y"}},
	}
	if err := b.Validate(); err != nil {
		t.Fatal(err)
	}
	if b.Len() != 2 {
		t.Errorf("Len = %d, want 2", b.Len())
	}
	if f, ok := b.Float64("f"); !ok || !slices.Equal(f, []float64{1, 2}) {
		t.Errorf("Float64(f) = %v %v", f, ok)
	}
	if i, ok := b.Int64("i"); !ok || !slices.Equal(i, []int64{3, 4}) {
		t.Errorf("Int64(i) = %v %v", i, ok)
	}
	if s, ok := b.String("s"); !ok || !slices.Equal(s, []string{"x", "y"}) {
		t.Errorf("String(s) = %v %v", s, ok)
	}
	if c, ok := b.Column("f"); !ok || c.Unit != "m" {
		t.Errorf("Column(f) = %+v %v", c, ok)
	}
	misses := []struct {
		name string
		ok   bool
	}{
		{"Float64 of int column", second(b.Float64("i"))},
		{"Int64 of string column", second(b.Int64("s"))},
		{"String of float column", second(b.String("f"))},
		{"Float64 of missing column", second(b.Float64("nope"))},
		{"Column of missing column", second(b.Column("nope"))},
	}
	for _, m := range misses {
		if m.ok {
			t.Errorf("%s: ok is true", m.name)
		}
	}
	var empty *Batch
	if empty.Len() != 0 || (&Batch{}).Len() != 0 {
		t.Error("empty batch has rows")
	}
	if _, ok := empty.Float64("f"); ok {
		t.Error("nil batch has a column")
	}
}

func TestNewBatch(t *testing.T) {
	cols := []Column{{Name: "a", Kind: Float64}, {Name: "b", Kind: Int64}, {Name: "c", Kind: String}}
	b, err := NewBatch(cols, 10)
	if err != nil {
		t.Fatal(err)
	}
	if b.Len() != 0 {
		t.Errorf("new batch has %d rows", b.Len())
	}
	if f, _ := b.Float64("a"); cap(f) != 10 {
		t.Errorf("capacity %d, want 10", cap(f))
	}
	cols[0].Name = "changed"
	if b.Columns[0].Name != "a" {
		t.Error("NewBatch aliases the caller's column slice")
	}
	for _, bad := range [][]Column{
		{{Name: "a", Kind: Kind(-1)}},
		{{Name: "a"}, {Name: "a"}},
		{{Name: ""}},
	} {
		if _, err := NewBatch(bad, 0); err == nil {
			t.Errorf("NewBatch(%v): no error", bad)
		}
	}
}

func TestAppend(t *testing.T) {
	cols := []Column{{Name: "f", Kind: Float64, Unit: "s"}, {Name: "i", Kind: Int64}, {Name: "s", Kind: String}}
	mk := func(f []float64, i []int64, s []string) *Batch {
		return &Batch{Columns: slices.Clone(cols), Data: []any{f, i, s}}
	}
	a := mk([]float64{1}, []int64{2}, []string{"a"})
	o := mk([]float64{3, 4}, []int64{5, 6}, []string{"b", "c"})
	if err := a.Append(o); err != nil {
		t.Fatal(err)
	}
	f, _ := a.Float64("f")
	i, _ := a.Int64("i")
	s, _ := a.String("s")
	if !slices.Equal(f, []float64{1, 3, 4}) || !slices.Equal(i, []int64{2, 5, 6}) || !slices.Equal(s, []string{"a", "b", "c"}) {
		t.Errorf("after Append: %v %v %v", f, i, s)
	}
	// Appending to itself doubles the rows.
	if err := a.Append(a); err != nil || a.Len() != 6 {
		t.Errorf("self append: len %d, err %v", a.Len(), err)
	}

	// An empty batch adopts the columns and copies the data.
	var e Batch
	if err := e.Append(o); err != nil {
		t.Fatal(err)
	}
	o.Data[0].([]float64)[0] = 99
	if g, _ := e.Float64("f"); g[0] != 3 {
		t.Error("Append into an empty batch aliases the source data")
	}

	tests := []struct {
		name    string
		o       *Batch
		wantErr string
	}{
		{"other unit", &Batch{Columns: []Column{{Name: "f", Kind: Float64, Unit: "m"}, cols[1], cols[2]}, Data: []any{[]float64{1}, []int64{1}, []string{""}}}, `column 0 is "f" (float64, unit "s") vs "f" (float64, unit "m")`},
		{"fewer columns", &Batch{Columns: cols[:2], Data: []any{[]float64{1}, []int64{1}}}, "3 columns vs 2"},
		{"other order", &Batch{Columns: []Column{cols[1], cols[0], cols[2]}, Data: []any{[]int64{1}, []float64{1}, []string{""}}}, "column 0"},
		{"invalid", &Batch{Columns: cols, Data: []any{[]float64{1}, []int64{1, 2}, []string{""}}}, "appended batch"},
		{"nil", nil, "nil batch"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			b := mk([]float64{1}, []int64{2}, []string{"a"})
			err := b.Append(tc.o)
			if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
				t.Errorf("error %v, want one containing %q", err, tc.wantErr)
			}
			if b.Len() != 1 {
				t.Errorf("failed Append changed the batch to %d rows", b.Len())
			}
		})
	}
}

func TestKindString(t *testing.T) {
	for k, want := range map[Kind]string{Float64: "float64", Int64: "int64", String: "string", Kind(7): "kind(7)"} {
		if got := k.String(); got != want {
			t.Errorf("Kind(%d).String() = %q, want %q", int(k), got, want)
		}
	}
}
