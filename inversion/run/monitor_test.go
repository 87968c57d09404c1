package run

import (
	"reflect"
	"testing"

	"plumb/inversion/problem"
	"plumb/priors"
)

// The monitor keeps exactly the draws whose index is a multiple of its stride, whatever the order
// in which chains deliver them (chain by chain per checkpoint, as a run does, or interleaved, as a
// rebuild from Parquet parts may), so the stopping rule sees the same history after a resume.
func TestMonitorKeptSetIsOrderFree(t *testing.T) {
	u, err := priors.NewUniform(0, 1)
	if err != nil {
		t.Fatal(err)
	}
	p := &problem.Problem{Space: priors.Space{Params: []priors.Param{
		{Name: "a_km", Unit: "km", ToUnit: 1e-3, Prior: u},
		{Name: "b", ToUnit: 1, Prior: u},
	}}}
	const chains, n = 3, 3*monitorCap + 123
	val := func(c int, i int64) []float64 { return []float64{float64(c*1000000) + float64(i), -float64(i)} }
	byChain := newMonitor(p, chains)
	for start := int64(0); start < n; start += 1000 { // checkpoint intervals of 1000 draws
		for c := range chains {
			for i := start; i < min(start+1000, n); i++ {
				byChain.add(c, i, val(c, i))
			}
		}
	}
	interleaved := newMonitor(p, chains)
	for i := int64(0); i < n; i++ {
		for c := chains - 1; c >= 0; c-- {
			interleaved.add(c, i, val(c, i))
		}
	}
	if byChain.stride != 4 || !reflect.DeepEqual(byChain.kept, interleaved.kept) {
		t.Fatalf("stride %d / %d; kept sets differ: %v", byChain.stride, interleaved.stride, !reflect.DeepEqual(byChain.kept, interleaved.kept))
	}
	for c := range chains {
		for j, v := range byChain.kept[0][c] {
			if want := val(c, int64(j)*byChain.stride)[0] * 1e-3; v != want {
				t.Fatalf("chain %d kept[%d] = %g, want draw %d (%g)", c, j, v, int64(j)*byChain.stride, want)
			}
		}
		if len(byChain.kept[0][c]) > monitorCap {
			t.Fatalf("chain %d keeps %d draws, cap %d", c, len(byChain.kept[0][c]), monitorCap)
		}
	}
}
