package store

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"testing"
)

// benchBatch is 10^5 rows of 12 float64 columns of smoothly varying,
// full-precision values, similar to posterior draws.
func benchBatch() *Batch {
	const rows, cols = 100_000, 12
	b := &Batch{}
	for c := range cols {
		v := make([]float64, rows)
		for r := range v {
			v[r] = math.Sin(float64(r)*0.001+float64(c)) * math.Pow(10, float64(c-6))
		}
		b.Columns = append(b.Columns, Column{Name: fmt.Sprintf("param_%02d", c), Kind: Float64, Unit: "1"})
		b.Data = append(b.Data, v)
	}
	return b
}

// BenchmarkWritePart measures the full atomic write (encode, fsync, rename,
// directory fsync). MB/s counts the raw float64 payload.
func BenchmarkWritePart(b *testing.B) {
	batch := benchBatch()
	dir := b.TempDir()
	path := filepath.Join(dir, PartName(0))
	b.SetBytes(int64(batch.Len() * len(batch.Columns) * 8))
	b.ReportAllocs()
	for b.Loop() {
		if err := WritePart(path, batch, map[string]string{"run": "bench"}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEncode measures Parquet encoding alone, into memory.
func BenchmarkEncode(b *testing.B) {
	batch := benchBatch()
	cfg := writeConfig{rowGroupRows: DefaultRowGroupRows}
	var buf bytes.Buffer
	b.SetBytes(int64(batch.Len() * len(batch.Columns) * 8))
	b.ReportAllocs()
	for b.Loop() {
		buf.Reset()
		if err := encodeParquet(&buf, batch, nil, cfg); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len())/float64(batch.Len()*len(batch.Columns)*8), "size/raw")
}

// chainBatch is 10^5 rows of 12 float64 columns shaped like a Metropolis
// chain with 30% acceptance: a rejected step repeats the previous row.
func chainBatch() *Batch {
	const rows, cols = 100_000, 12
	rng := rand.New(rand.NewPCG(1, 2))
	b := &Batch{}
	cur := make([]float64, cols)
	data := make([][]float64, cols)
	for c := range data {
		data[c] = make([]float64, rows)
		b.Columns = append(b.Columns, Column{Name: fmt.Sprintf("param_%02d", c), Kind: Float64})
	}
	for r := range rows {
		if rng.Float64() < 0.3 {
			for c := range cur {
				cur[c] += rng.NormFloat64() * math.Pow(10, float64(c-6))
			}
		}
		for c := range cur {
			data[c][r] = cur[c]
		}
	}
	for _, d := range data {
		b.Data = append(b.Data, d)
	}
	return b
}

// BenchmarkEncodeChain is BenchmarkEncode on chain-like data, which
// compresses; size/raw is the file size over the raw payload.
func BenchmarkEncodeChain(b *testing.B) {
	batch := chainBatch()
	cfg := writeConfig{rowGroupRows: DefaultRowGroupRows}
	var buf bytes.Buffer
	b.SetBytes(int64(batch.Len() * len(batch.Columns) * 8))
	b.ReportAllocs()
	for b.Loop() {
		buf.Reset()
		if err := encodeParquet(&buf, batch, nil, cfg); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len())/float64(batch.Len()*len(batch.Columns)*8), "size/raw")
}

// BenchmarkReadPart measures reading the same file back.
func BenchmarkReadPart(b *testing.B) {
	batch := benchBatch()
	path := filepath.Join(b.TempDir(), PartName(0))
	if err := WritePart(path, batch, nil); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(batch.Len() * len(batch.Columns) * 8))
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := ReadPart(path); err != nil {
			b.Fatal(err)
		}
	}
}
