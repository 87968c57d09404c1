package store_test

import (
	"fmt"
	"os"
	"path/filepath"

	"plumb/inversion/store"
)

// Two batches written as two parts of one directory and read back as one table. The columns come
// back in alphabetical order, with their units.
func ExampleWritePart() {
	dir, err := os.MkdirTemp("", "store-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)

	cols := []store.Column{
		{Name: "x_m", Kind: store.Float64, Unit: "m"},
		{Name: "draw", Kind: store.Int64},
		{Name: "label", Kind: store.String},
	}
	parts := []*store.Batch{
		{Columns: cols, Data: []any{[]float64{1.5, 2.25, -0.5}, []int64{0, 1, 2}, []string{"a", "b", "a"}}},
		{Columns: cols, Data: []any{[]float64{3, 4.125}, []int64{3, 4}, []string{"b", "b"}}},
	}
	for i, b := range parts {
		meta := map[string]string{"source": "example"}
		if err := store.WritePart(filepath.Join(dir, store.PartName(i)), b, meta); err != nil {
			fmt.Println(err)
			return
		}
	}

	all, meta, err := store.ReadParts(dir)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("rows:", all.Len())
	for _, c := range all.Columns {
		fmt.Printf("column %s (%v, unit %q)\n", c.Name, c.Kind, c.Unit)
	}
	x, _ := all.Float64("x_m")
	fmt.Println("x_m:", x)
	fmt.Println("source:", meta["source"])
	// Output:
	// rows: 5
	// column draw (int64, unit "")
	// column label (string, unit "")
	// column x_m (float64, unit "m")
	// x_m: [1.5 2.25 -0.5 3 4.125]
	// source: example
}
