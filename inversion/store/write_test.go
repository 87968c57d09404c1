package store

import (
	"bytes"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/format"
)

func TestRoundTrip(t *testing.T) {
	meta := map[string]string{
		"plumb.config": `{"model":"test","size":3}`,
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

func TestPartName(t *testing.T) {
	for i, want := range map[int]string{0: "part-00000.parquet", 42: "part-00042.parquet", 99999: "part-99999.parquet", 123456: "part-123456.parquet"} {
		if got := PartName(i); got != want {
			t.Errorf("PartName(%d) = %q, want %q", i, got, want)
		}
	}
}
