package store

import (
	"bytes"
	"encoding/binary"
	"math"
	"slices"
	"testing"
	"unicode/utf8"
)

// FuzzDecodeParquet feeds arbitrary bytes to the Parquet reader: it must
// return an error or a valid batch, never panic.
func FuzzDecodeParquet(f *testing.F) {
	var buf bytes.Buffer
	if err := encodeParquet(&buf, sampleBatch(40, 0), map[string]string{"k": "v"}, writeConfig{rowGroupRows: 16}); err != nil {
		f.Fatal(err)
	}
	good := buf.Bytes()
	f.Add(good)
	f.Add(good[:len(good)/2])
	f.Add(corruptMiddle(good))
	f.Add([]byte("PAR1PAR1"))
	f.Add([]byte{})
	f.Fuzz(func(t *testing.T, data []byte) {
		b, _, err := decodeParquet(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			return
		}
		if err := b.validate(false); err != nil {
			t.Fatalf("decoded an invalid batch: %v", err)
		}
	})
}

// FuzzRoundTrip writes batches built from fuzz input and checks that they
// read back bit for bit.
func FuzzRoundTrip(f *testing.F) {
	f.Add([]byte{0, 0, 0, 0, 0, 0, 0xf8, 0x7f}, "a\x00b", int64(-1), uint8(1))
	f.Add(bytes.Repeat([]byte{0xff}, 80), "ε", int64(math.MinInt64), uint8(3))
	f.Fuzz(func(t *testing.T, raw []byte, s string, i int64, rg uint8) {
		if !utf8.ValidString(s) {
			return
		}
		n := len(raw) / 8
		fl := make([]float64, n)
		in := make([]int64, n)
		st := make([]string, n)
		for r := range n {
			fl[r] = math.Float64frombits(binary.LittleEndian.Uint64(raw[8*r:]))
			in[r] = i + int64(r)
			st[r] = s[:r%(len(s)+1)]
			for !utf8.ValidString(st[r]) {
				st[r] = st[r][:len(st[r])-1]
			}
		}
		b := &Batch{
			Columns: []Column{{Name: "x", Kind: Float64, Unit: s}, {Name: "b", Kind: Int64}, {Name: "s", Kind: String}},
			Data:    []any{fl, in, st},
		}
		var buf bytes.Buffer
		if err := encodeParquet(&buf, b, map[string]string{"s": s}, writeConfig{rowGroupRows: int(rg) + 1}); err != nil {
			t.Fatal(err)
		}
		got, meta, err := decodeParquet(bytes.NewReader(buf.Bytes()), int64(buf.Len()))
		if err != nil {
			t.Fatal(err)
		}
		gf, _ := got.Float64("x")
		gi, _ := got.Int64("b")
		gs, _ := got.String("s")
		if !equalBits(gf, fl) || !slices.Equal(gi, in) || !slices.Equal(gs, st) {
			t.Fatal("data changed in the round trip")
		}
		if c, _ := got.Column("x"); c.Unit != s || meta["s"] != s {
			t.Fatalf("unit %q / metadata %q, want %q", c.Unit, meta["s"], s)
		}
	})
}
