package store

import (
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"sort"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/deprecated"
	"github.com/parquet-go/parquet-go/format"
)

// ErrNoParts is returned (wrapped) by ReadParts when a directory holds no
// part files.
var ErrNoParts = errors.New("no part files")

// PartPattern is the file-name pattern (path.Match syntax) of part files.
const PartPattern = "part-*.parquet"

// readBufferRows is the number of values decoded per call on the generic
// read path.
const readBufferRows = 4096

// maxGrow bounds how many rows are reserved ahead of reading, so that a
// corrupt row count cannot trigger a huge allocation.
const maxGrow = 1 << 20

// ReadPart reads a Parquet file written by WritePart, or any flat Parquet
// file of REQUIRED columns of supported types, into a Batch whose columns are
// in file order (for files from WritePart, alphabetical by name). It also
// returns the file's key-value metadata, without UnitsKey, whose content
// fills Column.Unit.
//
// Supported physical types: DOUBLE and FLOAT (read as Float64), INT64 and
// INT32 (read as Int64; unsigned 32-bit is widened, unsigned 64-bit is
// refused) and BYTE_ARRAY (read as String). Columns with another type, a
// non-integer logical type on an integer column, nullable, repeated or nested
// columns give an error that names the file and the column.
func ReadPart(path string) (*Batch, map[string]string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, fmt.Errorf("store: read %w", err)
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil, nil, fmt.Errorf("store: read %w", err)
	}
	b, meta, err := decodeParquet(f, st.Size())
	if err != nil {
		return nil, nil, fmt.Errorf("store: read %s: %w", path, err)
	}
	return b, meta, nil
}

// ListParts returns the paths of the part files (PartPattern) in dir in
// lexical order. Temporary files and directories are not included.
func ListParts(dir string) ([]string, error) {
	entries, err := os.ReadDir(dir) // sorted by name
	if err != nil {
		return nil, fmt.Errorf("store: list parts: %w", err)
	}
	var parts []string
	for _, e := range entries {
		if e.IsDir() {
			continue
		}
		if ok, _ := filepath.Match(PartPattern, e.Name()); ok {
			parts = append(parts, filepath.Join(dir, e.Name()))
		}
	}
	// Numeric order: PartName pads to five digits and widens beyond, so a longer name is a
	// larger index and equal lengths sort lexically.
	sort.SliceStable(parts, func(i, j int) bool {
		if len(parts[i]) != len(parts[j]) {
			return len(parts[i]) < len(parts[j])
		}
		return parts[i] < parts[j]
	})
	return parts, nil
}

// ReadParts reads every part file (PartPattern) in dir in index order and
// concatenates them. All parts must have the same columns (names, kinds and
// units); otherwise the error names the first differing file. Temporary files
// of interrupted writes are ignored. It returns the metadata of the first
// part, and an error wrapping ErrNoParts if there is none.
func ReadParts(dir string) (*Batch, map[string]string, error) {
	parts, err := ListParts(dir)
	if err != nil {
		return nil, nil, err
	}
	if len(parts) == 0 {
		return nil, nil, fmt.Errorf("store: read parts in %s: %w", dir, ErrNoParts)
	}
	var all *Batch
	var meta map[string]string
	for i, p := range parts {
		b, m, err := ReadPart(p)
		if err != nil {
			return nil, nil, err
		}
		if i == 0 {
			all, meta = b, m
			continue
		}
		if err := sameColumns(all.Columns, b.Columns); err != nil {
			return nil, nil, fmt.Errorf("store: read parts: %s has other columns than %s: %w", p, parts[0], err)
		}
		if err := all.Append(b); err != nil {
			return nil, nil, fmt.Errorf("store: read parts: %s: %w", p, err)
		}
	}
	return all, meta, nil
}

// conversion says how the values of a Parquet column become Batch data.
type conversion int

const (
	fromDouble conversion = iota
	fromFloat
	fromInt64
	fromInt32
	fromUint32
	fromByteArray
)

// columnConversion chooses the Batch kind and conversion for a leaf column.
func columnConversion(c *parquet.Column) (Kind, conversion, error) {
	t := c.Type()
	var lt any
	if l := t.LogicalType(); l != nil {
		lt = l.Value
	}
	unsigned := false
	if it, ok := lt.(*format.IntType); ok {
		unsigned = !it.IsSigned
	}
	if ct := t.ConvertedType(); ct != nil && (*ct == deprecated.Uint32 || *ct == deprecated.Uint64) {
		unsigned = true
	}
	badLogical := func() error {
		return fmt.Errorf("column %q: %v with logical type %v is not supported", c.Name(), t.Kind(), lt)
	}
	switch t.Kind() {
	case parquet.Double, parquet.Float:
		if lt != nil {
			return 0, 0, badLogical()
		}
		if t.Kind() == parquet.Float {
			return Float64, fromFloat, nil
		}
		return Float64, fromDouble, nil
	case parquet.Int64, parquet.Int32:
		if _, isInt := lt.(*format.IntType); lt != nil && !isInt {
			return 0, 0, badLogical()
		}
		switch {
		case t.Kind() == parquet.Int64 && unsigned:
			return 0, 0, fmt.Errorf("column %q: unsigned 64-bit integers are not supported", c.Name())
		case t.Kind() == parquet.Int64:
			return Int64, fromInt64, nil
		case unsigned:
			return Int64, fromUint32, nil
		default:
			return Int64, fromInt32, nil
		}
	case parquet.ByteArray:
		switch lt.(type) {
		case nil, *format.StringType, *format.EnumType, *format.JsonType:
			return String, fromByteArray, nil
		}
		return 0, 0, badLogical()
	}
	return 0, 0, fmt.Errorf("column %q: physical type %v is not supported", c.Name(), t.Kind())
}

// decodeParquet decodes a whole Parquet file of the given size.
func decodeParquet(r io.ReaderAt, size int64) (b *Batch, meta map[string]string, err error) {
	// A malformed file can make the Parquet library panic; report it as an
	// error instead.
	defer func() {
		if rec := recover(); rec != nil {
			b, meta, err = nil, nil, fmt.Errorf("malformed parquet file: %v", rec)
		}
	}()
	if err := checkFrame(r, size); err != nil {
		return nil, nil, err
	}
	pf, err := parquet.OpenFile(r, size, parquet.SkipPageIndex(true), parquet.SkipBloomFilters(true))
	if err != nil {
		return nil, nil, err
	}
	numRows := pf.NumRows()
	if numRows < 0 {
		return nil, nil, fmt.Errorf("negative row count %d", numRows)
	}
	cols := pf.Root().Columns()
	b = &Batch{Columns: make([]Column, len(cols)), Data: make([]any, len(cols))}
	for i, c := range cols {
		if !c.Leaf() {
			return nil, nil, fmt.Errorf("column %q is a group; nested data is not supported", c.Name())
		}
		if !c.Required() {
			return nil, nil, fmt.Errorf("column %q is optional or repeated; only required columns are supported", c.Name())
		}
		kind, conv, err := columnConversion(c)
		if err != nil {
			return nil, nil, err
		}
		data, err := readColumn(c, conv, numRows)
		if err != nil {
			return nil, nil, fmt.Errorf("column %q: %w", c.Name(), err)
		}
		if l := dataLen(data); int64(l) != numRows {
			return nil, nil, fmt.Errorf("column %q has %d values but the file has %d rows", c.Name(), l, numRows)
		}
		b.Columns[i] = Column{Name: c.Name(), Kind: kind}
		b.Data[i] = data
	}

	meta = make(map[string]string)
	for _, kv := range pf.Metadata().KeyValueMetadata {
		meta[kv.Key] = kv.Value
	}
	if u, ok := meta[UnitsKey]; ok {
		delete(meta, UnitsKey)
		var units map[string]string
		if err := json.Unmarshal([]byte(u), &units); err != nil {
			return nil, nil, fmt.Errorf("metadata %q: %w", UnitsKey, err)
		}
		for name, unit := range units {
			i := b.index(name)
			if i < 0 {
				return nil, nil, fmt.Errorf("metadata %q names column %q, which the file does not have", UnitsKey, name)
			}
			b.Columns[i].Unit = unit
		}
	}
	if err := b.validate(false); err != nil {
		return nil, nil, err
	}
	return b, meta, nil
}

// checkFrame checks the magic bytes at both ends of a Parquet file and that
// the footer length fits in the file. The Parquet library allocates a buffer
// of the stated footer length before checking it, so a truncated or
// corrupted file could otherwise cost gigabytes of memory.
func checkFrame(r io.ReaderAt, size int64) error {
	const magic = "PAR1"
	if size < 12 {
		return fmt.Errorf("not a parquet file: only %d bytes", size)
	}
	var head [4]byte
	var tail [8]byte
	if _, err := r.ReadAt(head[:], 0); err != nil {
		return fmt.Errorf("read header: %w", err)
	}
	if _, err := r.ReadAt(tail[:], size-8); err != nil {
		return fmt.Errorf("read footer: %w", err)
	}
	if string(head[:]) != magic {
		return errors.New("not a parquet file: missing PAR1 at the start")
	}
	if string(tail[4:]) != magic {
		return errors.New("not a parquet file or truncated: missing PAR1 at the end")
	}
	if n := int64(binary.LittleEndian.Uint32(tail[:4])); n > size-12 {
		return fmt.Errorf("corrupt parquet file: footer of %d bytes in a %d-byte file", n, size)
	}
	return nil
}

// readColumn reads all values of a leaf column across row groups.
func readColumn(c *parquet.Column, conv conversion, numRows int64) (any, error) {
	pages := c.Pages()
	defer pages.Close()
	hint := int(min(numRows, maxGrow))
	var (
		f64 []float64
		i64 []int64
		str []string
	)
	switch conv {
	case fromDouble, fromFloat:
		f64 = make([]float64, 0, hint)
	case fromInt64, fromInt32, fromUint32:
		i64 = make([]int64, 0, hint)
	default:
		str = make([]string, 0, hint)
	}
	buf := make([]parquet.Value, readBufferRows)
	for {
		p, err := pages.ReadPage()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if p.NumNulls() != 0 {
			parquet.Release(p)
			return nil, errors.New("page contains nulls")
		}
		err = readPage(p, conv, buf, &f64, &i64, &str)
		parquet.Release(p)
		if err != nil {
			return nil, err
		}
		if int64(len(f64)+len(i64)+len(str)) > numRows {
			return nil, fmt.Errorf("more values than the file's %d rows", numRows)
		}
	}
	switch conv {
	case fromDouble, fromFloat:
		return f64, nil
	case fromInt64, fromInt32, fromUint32:
		return i64, nil
	}
	return str, nil
}

// readPage appends the values of one page to the slice that matches conv.
func readPage(p parquet.Page, conv conversion, buf []parquet.Value, f64 *[]float64, i64 *[]int64, str *[]string) error {
	vr := p.Values()
	grow := int(min(max(p.NumValues(), 0), maxGrow))
	// Fast paths for plain (non-dictionary) pages.
	switch conv {
	case fromDouble:
		if dr, ok := vr.(parquet.DoubleReader); ok {
			return readTyped(dr.ReadDoubles, f64, grow)
		}
	case fromInt64:
		if ir, ok := vr.(parquet.Int64Reader); ok {
			return readTyped(ir.ReadInt64s, i64, grow)
		}
	}
	for {
		n, err := vr.ReadValues(buf)
		for _, v := range buf[:n] {
			if v.IsNull() {
				return errors.New("null value in a required column")
			}
			switch conv {
			case fromDouble:
				*f64 = append(*f64, v.Double())
			case fromFloat:
				*f64 = append(*f64, float64(v.Float()))
			case fromInt64:
				*i64 = append(*i64, v.Int64())
			case fromInt32:
				*i64 = append(*i64, int64(v.Int32()))
			case fromUint32:
				*i64 = append(*i64, int64(v.Uint32()))
			case fromByteArray:
				*str = append(*str, string(v.ByteArray()))
			}
		}
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
		if n == 0 {
			return errors.New("page reader made no progress")
		}
	}
}

// readTyped appends everything read by read to *dst.
func readTyped[T any](read func([]T) (int, error), dst *[]T, grow int) error {
	out := *dst
	for {
		if cap(out)-len(out) < readBufferRows {
			out = slices.Grow(out, max(grow, readBufferRows))
		}
		n, err := read(out[len(out):cap(out)])
		out = out[:len(out)+n]
		if err == io.EOF {
			*dst = out
			return nil
		}
		if err != nil {
			return err
		}
		if n == 0 {
			return errors.New("page reader made no progress")
		}
	}
}
