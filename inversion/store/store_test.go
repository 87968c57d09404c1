package store

import (
	"bytes"
	"errors"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/format"
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

func TestRoundTrip(t *testing.T) {
	meta := map[string]string{
		"plumb.config": `{"planet":"test","layers":3}`,
		"chain":        "7",
		"empty":        "",
		"ünïcode":      "värde\n",
	}
	tests := []struct {
		name          string
		rows          int
		rowGroupRows  int
		wantRowGroups int
	}{
		{"empty", 0, 0, 0},
		{"one row", 1, 0, 1},
		{"several row groups", 10007, 1000, 11},
		{"row group larger than a write chunk", 9000, 4097, 3},
		{"default row group", 70000, 0, 2},
		{"one row per group", 13, 1, 13},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), PartName(0))
			want := sampleBatch(tc.rows, 3)
			if err := WritePart(path, want, meta, RowGroupRows(tc.rowGroupRows)); err != nil {
				t.Fatal(err)
			}
			got, gotMeta, err := ReadPart(path)
			if err != nil {
				t.Fatal(err)
			}
			assertSameData(t, want, got)
			if len(gotMeta) != len(meta) {
				t.Errorf("metadata %v, want %v", gotMeta, meta)
			}
			for k, v := range meta {
				if gotMeta[k] != v {
					t.Errorf("metadata %q = %q, want %q", k, gotMeta[k], v)
				}
			}
			if n := countRowGroups(t, path); n != tc.wantRowGroups {
				t.Errorf("file has %d row groups, want %d", n, tc.wantRowGroups)
			}
		})
	}
}

func countRowGroups(t *testing.T, path string) int {
	t.Helper()
	pf := openParquet(t, path)
	return len(pf.Metadata().RowGroups)
}

func openParquet(t *testing.T, path string) *parquet.File {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	st, err := f.Stat()
	if err != nil {
		t.Fatal(err)
	}
	pf, err := parquet.OpenFile(f, st.Size())
	if err != nil {
		t.Fatal(err)
	}
	return pf
}

// TestFileLayout checks the footer for the plain, widely readable layout
// promised in the package doc: flat REQUIRED DOUBLE/INT64/BYTE_ARRAY(STRING)
// columns in alphabetical order, zstd compression, version 1 data pages,
// a constant created_by and units as JSON.
func TestFileLayout(t *testing.T) {
	path := filepath.Join(t.TempDir(), PartName(0))
	b := sampleBatch(5000, 0)
	if err := WritePart(path, b, nil, RowGroupRows(2000)); err != nil {
		t.Fatal(err)
	}
	md := openParquet(t, path).Metadata()
	if md.CreatedBy != createdBy {
		t.Errorf("created_by %q, want %q", md.CreatedBy, createdBy)
	}
	type leaf struct {
		name   string
		typ    format.Type
		isUTF8 bool
	}
	want := []leaf{ // alphabetical
		{"chain_label", format.ByteArray, true},
		{"step", format.Int64, false},
		{"theta", format.Double, false},
	}
	if len(md.Schema) != 1+len(want) {
		t.Fatalf("schema has %d elements, want %d", len(md.Schema), 1+len(want))
	}
	for i, w := range want {
		e := md.Schema[1+i]
		typ, _ := e.Type.Get()
		rep, hasRep := e.RepetitionType.Get()
		_, hasChildren := e.NumChildren.Get()
		if e.Name != w.name || typ != w.typ || !hasRep || rep != format.Required || hasChildren {
			t.Errorf("schema element %d = %s %v %v, want REQUIRED %s %v", i, e.Name, rep, typ, w.name, w.typ)
		}
		_, isString := e.LogicalType.Value.(*format.StringType)
		if isString != w.isUTF8 {
			t.Errorf("column %s: STRING logical type %v, want %v", w.name, isString, w.isUTF8)
		}
	}
	for r, rg := range md.RowGroups {
		for _, cc := range rg.Columns {
			if cc.MetaData.Codec != format.Zstd {
				t.Errorf("row group %d column %v: codec %v, want ZSTD", r, cc.MetaData.PathInSchema, cc.MetaData.Codec)
			}
			for _, e := range cc.MetaData.Encoding {
				if e != format.Plain {
					t.Errorf("row group %d column %v: encoding %v, want only PLAIN", r, cc.MetaData.PathInSchema, e)
				}
			}
		}
	}
	var units string
	for _, kv := range md.KeyValueMetadata {
		if kv.Key == UnitsKey {
			units = kv.Value
		}
	}
	if wantUnits := `{"chain_label":"—","step":"","theta":"kg m^-3"}`; units != wantUnits {
		t.Errorf("units metadata %q, want %q", units, wantUnits)
	}
	// Every data page must be version 1 (the footer's page encoding stats
	// list the page types of each chunk).
	for r, rg := range md.RowGroups {
		for _, cc := range rg.Columns {
			if len(cc.MetaData.EncodingStats) == 0 {
				t.Fatalf("row group %d column %v: no page encoding stats", r, cc.MetaData.PathInSchema)
			}
			for _, es := range cc.MetaData.EncodingStats {
				if es.PageType != format.DataPage {
					t.Errorf("row group %d column %v has a %v page, want only version 1 data pages", r, cc.MetaData.PathInSchema, es.PageType)
				}
			}
		}
	}
}

func TestColumnOrderIndependent(t *testing.T) {
	n := 300
	z, a, m, y := make([]float64, n), make([]int64, n), make([]float64, n), make([]string, n)
	for i := range n {
		z[i] = float64(i) + 0.5
		a[i] = int64(-i)
		m[i] = -float64(i) * 1e-300
		y[i] = strings.Repeat("y", i%7)
	}
	b := &Batch{
		Columns: []Column{
			{Name: "zeta", Kind: Float64, Unit: "m"},
			{Name: "alpha", Kind: Int64, Unit: "1"},
			{Name: "Mid", Kind: Float64, Unit: "Pa"},
			{Name: "yield", Kind: String},
		},
		Data: []any{z, a, m, y},
	}
	path := filepath.Join(t.TempDir(), PartName(0))
	if err := WritePart(path, b, nil, RowGroupRows(64)); err != nil {
		t.Fatal(err)
	}
	got, _, err := ReadPart(path)
	if err != nil {
		t.Fatal(err)
	}
	assertSameData(t, b, got)
	var names []string
	for _, c := range got.Columns {
		names = append(names, c.Name)
	}
	// Byte-wise order: upper case sorts before lower case.
	if want := []string{"Mid", "alpha", "yield", "zeta"}; !slices.Equal(names, want) {
		t.Errorf("file column order %v, want %v", names, want)
	}
}

func TestDeterministic(t *testing.T) {
	dir := t.TempDir()
	b := sampleBatch(20000, 11)
	// Many keys, so that map iteration order would show if it leaked.
	meta := map[string]string{}
	for _, k := range []string{"k", "a", "z", "m", "b", "y", "c", "x", "d", "w"} {
		meta[k] = "v" + k
	}
	var files [][]byte
	for i := range 3 {
		p := filepath.Join(dir, PartName(i))
		if err := WritePart(p, b, meta, RowGroupRows(3000)); err != nil {
			t.Fatal(err)
		}
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		files = append(files, data)
	}
	for i := 1; i < len(files); i++ {
		if !bytes.Equal(files[0], files[i]) {
			t.Errorf("write %d differs from write 0 (%d vs %d bytes)", i, len(files[i]), len(files[0]))
		}
	}
}

func TestNoTempFilesAfterWrite(t *testing.T) {
	dir := t.TempDir()
	if err := WritePart(filepath.Join(dir, PartName(0)), sampleBatch(100, 0), nil); err != nil {
		t.Fatal(err)
	}
	if err := WriteFileAtomic(filepath.Join(dir, "checkpoint.json"), []byte("{}"), 0o600); err != nil {
		t.Fatal(err)
	}
	assertDir(t, dir, "checkpoint.json", PartName(0))
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

func TestWriteToMissingDirectory(t *testing.T) {
	path := filepath.Join(t.TempDir(), "no", "such", "dir", PartName(0))
	err := WritePart(path, sampleBatch(10, 0), nil)
	if err == nil {
		t.Fatal("no error")
	}
	if !strings.Contains(err.Error(), path) {
		t.Errorf("error %q does not name %s", err, path)
	}
	if !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("error %q does not wrap fs.ErrNotExist", err)
	}
	err = WriteFileAtomic(path, []byte("x"), 0o644)
	if err == nil || !strings.Contains(err.Error(), path) {
		t.Errorf("WriteFileAtomic error %v does not name %s", err, path)
	}
}

func TestWriteRejectsBadInput(t *testing.T) {
	f3 := []float64{1, 2, 3}
	i3 := []int64{1, 2, 3}
	tests := []struct {
		name    string
		b       *Batch
		meta    map[string]string
		wantErr string
	}{
		{"nil batch", nil, nil, "nil batch"},
		{"no columns", &Batch{}, nil, "no columns"},
		{"length mismatch", &Batch{
			Columns: []Column{{Name: "a", Kind: Float64}, {Name: "b", Kind: Int64}},
			Data:    []any{f3, []int64{1, 2}},
		}, nil, `column "b" has 2 rows`},
		{"kind mismatch", &Batch{
			Columns: []Column{{Name: "a", Kind: Float64}},
			Data:    []any{i3},
		}, nil, `column "a" is declared float64 but its data is []int64`},
		{"nil data", &Batch{
			Columns: []Column{{Name: "a", Kind: String}},
			Data:    []any{nil},
		}, nil, `column "a" is declared string but its data is nil`},
		{"unsupported data type", &Batch{
			Columns: []Column{{Name: "a", Kind: Float64}},
			Data:    []any{[]float32{1}},
		}, nil, "[]float32"},
		{"invalid kind", &Batch{
			Columns: []Column{{Name: "a", Kind: Kind(9)}},
			Data:    []any{f3},
		}, nil, "invalid kind kind(9)"},
		{"count mismatch", &Batch{
			Columns: []Column{{Name: "a", Kind: Float64}},
			Data:    []any{f3, i3},
		}, nil, "1 columns but 2 data slices"},
		{"duplicate name", &Batch{
			Columns: []Column{{Name: "a", Kind: Float64}, {Name: "a", Kind: Int64}},
			Data:    []any{f3, i3},
		}, nil, `duplicate column name "a"`},
		{"empty name", &Batch{
			Columns: []Column{{Name: "", Kind: Float64}},
			Data:    []any{f3},
		}, nil, "column 0 has an empty name"},
		{"invalid UTF-8", &Batch{
			Columns: []Column{{Name: "s", Kind: String}},
			Data:    []any{[]string{"ok", "bad\xff"}},
		}, nil, `column "s" row 1 is not valid UTF-8`},
		{"reserved metadata key", &Batch{
			Columns: []Column{{Name: "a", Kind: Float64}},
			Data:    []any{f3},
		}, map[string]string{UnitsKey: "{}"}, "reserved"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, PartName(0))
			err := WritePart(path, tc.b, tc.meta)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), tc.wantErr) || !strings.Contains(err.Error(), path) {
				t.Errorf("error %q does not contain %q and the path", err, tc.wantErr)
			}
			assertDir(t, dir)
		})
	}
}

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

// corruptMiddle returns a copy of data with bytes in the middle flipped.
func corruptMiddle(data []byte) []byte {
	c := bytes.Clone(data)
	for i := len(c) / 3; i < len(c)/3+64 && i < len(c); i++ {
		c[i] ^= 0xa5
	}
	return c
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
