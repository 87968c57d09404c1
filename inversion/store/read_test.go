package store

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// writeParts writes the given batches as parts with the given indices.
func writeParts(t *testing.T, dir string, idx []int, bs []*Batch) {
	t.Helper()
	for k, i := range idx {
		meta := map[string]string{"part": PartName(i)}
		if err := WritePart(filepath.Join(dir, PartName(i)), bs[k], meta, RowGroupRows(50)); err != nil {
			t.Fatal(err)
		}
	}
}

func TestReadPartsConcatenatesInLexicalOrder(t *testing.T) {
	dir := t.TempDir()
	parts := []*Batch{sampleBatch(120, 0), sampleBatch(7, 1000), sampleBatch(333, 2000)}
	// Write out of order, so that creation order differs from name order.
	writeParts(t, dir, []int{2, 0, 1}, []*Batch{parts[2], parts[0], parts[1]})
	// Files that are not parts must be ignored.
	for _, name := range []string{"part-00003.parquet.bak", "notes.txt", ".part-00004.parquet.123" + TempSuffix} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte("not parquet"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Mkdir(filepath.Join(dir, "part-99999.parquet"), 0o755); err != nil { // a directory
		t.Fatal(err)
	}
	got, meta, err := ReadParts(dir)
	if err != nil {
		t.Fatal(err)
	}
	want := &Batch{}
	for _, p := range parts {
		if err := want.Append(p); err != nil {
			t.Fatal(err)
		}
	}
	assertSameData(t, want, got)
	if meta["part"] != PartName(0) {
		t.Errorf("metadata is from %q, want the first part", meta["part"])
	}
	list, err := ListParts(dir)
	if err != nil {
		t.Fatal(err)
	}
	wantList := []string{filepath.Join(dir, PartName(0)), filepath.Join(dir, PartName(1)), filepath.Join(dir, PartName(2))}
	if !slices.Equal(list, wantList) {
		t.Errorf("ListParts = %q, want %q", list, wantList)
	}
}

func TestReadPartsSchemaMismatch(t *testing.T) {
	base := func() *Batch { return sampleBatch(10, 0) }
	tests := []struct {
		name   string
		modify func(b *Batch)
	}{
		{"renamed column", func(b *Batch) { b.Columns[1].Name = "iteration" }},
		{"other unit", func(b *Batch) { b.Columns[0].Unit = "m" }},
		{"other kind", func(b *Batch) {
			b.Columns[1].Kind = Float64
			b.Data[1] = make([]float64, 10)
		}},
		{"extra column", func(b *Batch) {
			b.Columns = append(b.Columns, Column{Name: "extra", Kind: Int64})
			b.Data = append(b.Data, make([]int64, 10))
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			other := base()
			tc.modify(other)
			writeParts(t, dir, []int{0, 1}, []*Batch{base(), other})
			_, _, err := ReadParts(dir)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), PartName(1)) || !strings.Contains(err.Error(), "other columns") {
				t.Errorf("error %q does not name the mismatching part", err)
			}
		})
	}
}

func TestReadPartsEmptyAndMissing(t *testing.T) {
	dir := t.TempDir()
	if _, _, err := ReadParts(dir); !errors.Is(err, ErrNoParts) {
		t.Errorf("empty directory: error %v, want ErrNoParts", err)
	}
	missing := filepath.Join(dir, "missing")
	if _, _, err := ReadParts(missing); err == nil || !strings.Contains(err.Error(), missing) {
		t.Errorf("missing directory: error %v does not name it", err)
	}
}

func TestReadPartRejectsNonParquet(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.parquet")
	if err := WritePart(good, sampleBatch(1000, 0), nil); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(good)
	if err != nil {
		t.Fatal(err)
	}
	hugeFooter := bytes.Clone(data)
	copy(hugeFooter[len(hugeFooter)-8:], []byte{0xf0, 0xff, 0xff, 0xff})
	tests := []struct {
		name    string
		content []byte
		wantErr string
	}{
		{"empty", nil, "only 0 bytes"},
		{"text", []byte("theta,step\n1,2\n"), "missing PAR1 at the start"},
		{"truncated", data[:len(data)/2], "missing PAR1 at the end"}, // what a killed writer leaves
		{"missing footer", data[:len(data)-8], "missing PAR1 at the end"},
		{"huge footer length", hugeFooter, "footer of 4294967280 bytes"},
		{"corrupt payload", corruptMiddle(data), ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "_")+".parquet")
			if err := os.WriteFile(p, tc.content, 0o644); err != nil {
				t.Fatal(err)
			}
			_, _, err := ReadPart(p)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), p) || !strings.Contains(err.Error(), tc.wantErr) {
				t.Errorf("error %q does not name %s and contain %q", err, p, tc.wantErr)
			}
		})
	}
}

// TestReadForeignFiles reads flat files written directly with parquet-go
// (not through WritePart), with types that WritePart does not produce.
func TestReadForeignFiles(t *testing.T) {
	dir := t.TempDir()

	type flat struct {
		Small  int32   `parquet:"small"`
		U32    uint32  `parquet:"u32"`
		Single float32 `parquet:"single"`
		Bytes  []byte  `parquet:"bytes"`
		Name   string  `parquet:"name,dict"`
		Dict   float64 `parquet:"dict,dict"`
	}
	rows := []flat{
		{-5, math.MaxUint32, 0.1, []byte("raw"), "a", 1.5},
		{math.MaxInt32, 0, float32(math.Inf(-1)), nil, "b", 1.5},
		{math.MinInt32, 7, -0.0, []byte{}, "a", -2},
	}
	p := filepath.Join(dir, "flat.parquet")
	if err := parquet.WriteFile(p, rows); err != nil {
		t.Fatal(err)
	}
	b, _, err := ReadPart(p)
	if err != nil {
		t.Fatal(err)
	}
	wantKinds := map[string]Kind{"small": Int64, "u32": Int64, "single": Float64, "bytes": String, "name": String, "dict": Float64}
	for name, k := range wantKinds {
		if c, ok := b.Column(name); !ok || c.Kind != k {
			t.Errorf("column %q: %+v, want kind %v", name, c, k)
		}
	}
	small, _ := b.Int64("small")
	u32, _ := b.Int64("u32")
	single, _ := b.Float64("single")
	byts, _ := b.String("bytes")
	name, _ := b.String("name")
	dict, _ := b.Float64("dict")
	checks := []struct {
		what string
		ok   bool
	}{
		{"int32 widened", slices.Equal(small, []int64{-5, math.MaxInt32, math.MinInt32})},
		{"uint32 widened without sign", slices.Equal(u32, []int64{math.MaxUint32, 0, 7})},
		{"float32 widened exactly", equalBits(single, []float64{float64(float32(0.1)), math.Inf(-1), 0})},
		{"byte arrays", slices.Equal(byts, []string{"raw", "", ""})},
		{"dictionary strings", slices.Equal(name, []string{"a", "b", "a"})},
		{"dictionary doubles", equalBits(dict, []float64{1.5, 1.5, -2})},
	}
	for _, c := range checks {
		if !c.ok {
			t.Errorf("%s: wrong values", c.what)
		}
	}

	type optional struct {
		A float64  `parquet:"a"`
		B *float64 `parquet:"b,optional"`
	}
	type nested struct {
		A float64 `parquet:"a"`
		N struct {
			X int64 `parquet:"x"`
		} `parquet:"n"`
	}
	type repeated struct {
		L []int64 `parquet:"l,list"`
	}
	type unsigned64 struct {
		U uint64 `parquet:"u"`
	}
	type boolean struct {
		B bool `parquet:"flag"`
	}
	bad := []struct {
		name    string
		write   func(p string) error
		wantErr string
	}{
		{"optional", func(p string) error { return parquet.WriteFile(p, []optional{{A: 1}}) }, `column "b" is optional or repeated`},
		{"nested", func(p string) error { return parquet.WriteFile(p, []nested{{A: 1}}) }, `column "n" is a group`},
		{"list", func(p string) error { return parquet.WriteFile(p, []repeated{{L: []int64{1}}}) }, `column "l" is`},
		{"uint64", func(p string) error { return parquet.WriteFile(p, []unsigned64{{U: 1}}) }, `column "u": unsigned 64-bit`},
		{"boolean", func(p string) error { return parquet.WriteFile(p, []boolean{{B: true}}) }, `column "flag": physical type BOOLEAN`},
	}
	for _, tc := range bad {
		t.Run(tc.name, func(t *testing.T) {
			p := filepath.Join(dir, tc.name+".parquet")
			if err := tc.write(p); err != nil {
				t.Fatal(err)
			}
			_, _, err := ReadPart(p)
			if err == nil || !strings.Contains(err.Error(), tc.wantErr) || !strings.Contains(err.Error(), p) {
				t.Errorf("error %v, want one containing %q and the path", err, tc.wantErr)
			}
		})
	}
}

// Part indices beyond five digits still list in index order.
func TestListPartsNumericOrder(t *testing.T) {
	dir := t.TempDir()
	for _, i := range []int{100000, 2, 99999, 0} {
		if err := os.WriteFile(filepath.Join(dir, PartName(i)), nil, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got, err := ListParts(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, p := range got {
		names = append(names, filepath.Base(p))
	}
	want := []string{PartName(0), PartName(2), PartName(99999), PartName(100000)}
	if !reflect.DeepEqual(names, want) {
		t.Errorf("order %v, want %v", names, want)
	}
}
