// Package store reads and writes columnar data as flat Parquet part files,
// and arbitrary files (such as checkpoints) replaced atomically. It knows the
// names, kinds and units of the columns, never what they mean.
//
// A Batch holds named, typed columns of equal length (float64, int64 or
// string, each with a free-text unit). WritePart writes one batch as one
// part file; a directory of parts named by PartName is one table, which
// ReadParts reads back in index order (ListParts lists the parts, ReadPart
// reads one). WriteFileAtomic writes any other file the same safe way, and
// CleanTemp removes what interrupted writes left behind.
//
// Every file is written under a temporary name in its destination directory,
// fsynced, renamed into place and the directory fsynced, so a reader never
// sees a partially written file even if the writer is killed.
//
// The Parquet files use only widely supported, flat, REQUIRED columns:
// DOUBLE, INT64 and BYTE_ARRAY annotated as STRING, PLAIN encoded, compressed
// with zstd (fastest level) and written with version 1 data pages, so that
// pandas/pyarrow, DuckDB and similar tools read them without any extra code.
package store
