package store

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/compress/zstd"
)

// UnitsKey is the Parquet key-value metadata key under which WritePart
// stores the column units, as a JSON object {column name: unit} listing
// every column (unit "" when none). It is reserved: WritePart refuses
// caller metadata with this key, and ReadPart consumes it into Column.Unit
// rather than returning it.
const UnitsKey = "plumb.units"

// DefaultRowGroupRows is the number of rows per Parquet row group used when
// no RowGroupRows option is given.
const DefaultRowGroupRows = 1 << 16

// DefaultPerm is the permission of files written by WritePart unless the
// Perm option says otherwise.
const DefaultPerm os.FileMode = 0o644

// writeChunkRows is how many rows of one column are handed to the Parquet
// column writer at a time; it bounds the size of the conversion buffer.
const writeChunkRows = 4096

// createdBy is the constant "created_by" string written into every file
// footer, so that output does not depend on build information.
const createdBy = "plumb inversion/store (parquet-go)"

// Option configures WritePart.
type Option func(*writeConfig)

type writeConfig struct {
	rowGroupRows int
	perm         os.FileMode
}

// RowGroupRows sets the maximum number of rows per Parquet row group.
// Values below 1 select DefaultRowGroupRows.
func RowGroupRows(n int) Option {
	return func(c *writeConfig) {
		if n < 1 {
			n = DefaultRowGroupRows
		}
		c.rowGroupRows = n
	}
}

// Perm sets the permission bits of the written file (default DefaultPerm).
func Perm(perm os.FileMode) Option {
	return func(c *writeConfig) { c.perm = perm }
}

// PartName returns the file name of part i of a sample directory:
// "part-00000.parquet", "part-00001.parquet", …; indices above 99999 get
// more digits (ListParts orders them by index all the same).
func PartName(i int) string { return fmt.Sprintf("part-%05d.parquet", i) }

// createdByOption sets the footer's created_by string.
type createdByOption string

// ConfigureWriter implements parquet.WriterOption.
func (o createdByOption) ConfigureWriter(c *parquet.WriterConfig) { c.CreatedBy = string(o) }

// WritePart writes b as a Parquet file at path, atomically: the data go to a
// temporary file in the same directory which is fsynced and renamed over
// path, and then the directory is fsynced; an existing file at path is
// replaced. meta becomes the file's key-value metadata, and the column units
// are stored under UnitsKey. Columns are written in alphabetical order of
// their names (the order ReadPart returns). Float columns are stored bit for
// bit, NaN and ±Inf included.
//
// WritePart returns an error, naming path, if b is invalid (see
// Batch.Validate), has no columns, meta uses UnitsKey, or the file cannot be
// written; path is then left as it was.
func WritePart(path string, b *Batch, meta map[string]string, opts ...Option) error {
	cfg := writeConfig{rowGroupRows: DefaultRowGroupRows, perm: DefaultPerm}
	for _, o := range opts {
		o(&cfg)
	}
	if err := checkWritable(b, meta); err != nil {
		return fmt.Errorf("store: write %s: %w", path, err)
	}
	return writeAtomic(path, cfg.perm, func(w io.Writer) error {
		return encodeParquet(w, b, meta, cfg)
	})
}

// checkWritable reports why b and meta cannot be written, or nil.
func checkWritable(b *Batch, meta map[string]string) error {
	if err := b.Validate(); err != nil {
		return err
	}
	if len(b.Columns) == 0 {
		return errors.New("batch has no columns")
	}
	if _, ok := meta[UnitsKey]; ok {
		return fmt.Errorf("metadata key %q is reserved for the column units", UnitsKey)
	}
	return nil
}

// buildSchema returns the Parquet schema for cols and, for each column, its
// leaf column index in that schema (parquet.Group sorts fields by name, so
// the index generally differs from the position in cols).
func buildSchema(cols []Column) (*parquet.Schema, []int, error) {
	g := make(parquet.Group, len(cols))
	for _, c := range cols {
		var n parquet.Node
		switch c.Kind {
		case Float64:
			n = parquet.Leaf(parquet.DoubleType)
		case Int64:
			n = parquet.Leaf(parquet.Int64Type)
		case String:
			n = parquet.String()
		default:
			return nil, nil, fmt.Errorf("column %q has invalid kind %v", c.Name, c.Kind)
		}
		// PLAIN everywhere: the one encoding every reader supports (the
		// library would otherwise pick DELTA_LENGTH_BYTE_ARRAY for strings).
		g[c.Name] = parquet.Required(parquet.Encoded(n, &parquet.Plain))
	}
	schema := parquet.NewSchema("plumb", g)
	idx := make([]int, len(cols))
	for i, c := range cols {
		leaf, ok := schema.Lookup(c.Name)
		if !ok {
			return nil, nil, fmt.Errorf("column %q missing from the Parquet schema", c.Name)
		}
		idx[i] = leaf.ColumnIndex
	}
	return schema, idx, nil
}

// unitsJSON encodes the units of cols as a JSON object with sorted keys.
func unitsJSON(cols []Column) (string, error) {
	units := make(map[string]string, len(cols))
	for _, c := range cols {
		units[c.Name] = c.Unit
	}
	data, err := json.Marshal(units)
	if err != nil {
		return "", fmt.Errorf("encode units: %w", err)
	}
	return string(data), nil
}

// encodeParquet writes b (already validated) as a Parquet file to w.
func encodeParquet(w io.Writer, b *Batch, meta map[string]string, cfg writeConfig) (err error) {
	// The Parquet library reports some conditions by panicking; turn them
	// into errors rather than crashing a long run.
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("parquet encoder: %v", r)
		}
	}()
	schema, idx, err := buildSchema(b.Columns)
	if err != nil {
		return err
	}
	units, err := unitsJSON(b.Columns)
	if err != nil {
		return err
	}
	options := []parquet.WriterOption{
		schema,
		// zstd at its fastest level: on data with runs of repeated rows
		// (sampler draws repeat the previous row after a rejection) it
		// compresses about as well as the default level, faster, and better
		// than snappy (chosen by measurement; see DEVELOPERS.md).
		parquet.Compression(&zstd.Codec{Level: zstd.SpeedFastest, Concurrency: 1}),
		parquet.DataPageVersion(1),
		createdByOption(createdBy),
		parquet.KeyValueMetadata(UnitsKey, units),
	}
	for k, v := range meta { // the writer sorts metadata by key
		options = append(options, parquet.KeyValueMetadata(k, v))
	}
	pw := parquet.NewWriter(w, options...)
	cws := pw.ColumnWriters()

	n := b.Len()
	vals := make([]parquet.Value, 0, min(writeChunkRows, n))
	var scratch []byte
	for rg := 0; rg < n; rg += cfg.rowGroupRows {
		rgEnd := min(rg+cfg.rowGroupRows, n)
		for lo := rg; lo < rgEnd; lo += writeChunkRows {
			hi := min(lo+writeChunkRows, rgEnd)
			for i, d := range b.Data {
				ci := idx[i]
				vals = vals[:0]
				switch v := d.(type) {
				case []float64:
					for _, x := range v[lo:hi] {
						vals = append(vals, parquet.DoubleValue(x).Level(0, 0, ci))
					}
				case []int64:
					for _, x := range v[lo:hi] {
						vals = append(vals, parquet.Int64Value(x).Level(0, 0, ci))
					}
				case []string:
					// The column writer copies the bytes before returning,
					// so one scratch buffer serves the whole chunk.
					scratch = scratch[:0]
					for _, s := range v[lo:hi] {
						start := len(scratch)
						scratch = append(scratch, s...)
						vals = append(vals, parquet.ByteArrayValue(scratch[start:len(scratch):len(scratch)]).Level(0, 0, ci))
					}
				}
				got, err := cws[ci].WriteRowValues(vals)
				if err != nil {
					return fmt.Errorf("column %q rows %d-%d: %w", b.Columns[i].Name, lo, hi-1, err)
				}
				if got != hi-lo {
					return fmt.Errorf("column %q rows %d-%d: wrote %d rows", b.Columns[i].Name, lo, hi-1, got)
				}
			}
		}
		if err := pw.Flush(); err != nil {
			return fmt.Errorf("row group at row %d: %w", rg, err)
		}
	}
	if err := pw.Close(); err != nil {
		return fmt.Errorf("finish parquet file: %w", err)
	}
	return nil
}
