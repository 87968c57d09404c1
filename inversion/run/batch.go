package run

import (
	"plumb/inversion/problem"
	"plumb/inversion/store"
)

// sampleBatch converts buffered draws (per chain) of problem p into a columnar batch of the
// sample table (runfolder.SampleColumns) in chain-then-draw order.
func sampleBatch(cols []store.Column, p *problem.Problem, bufs [][]draw) *store.Batch {
	n := 0
	for _, b := range bufs {
		n += len(b)
	}
	data := make([]any, len(cols))
	for i, col := range cols {
		switch col.Kind {
		case store.Int64:
			data[i] = make([]int64, 0, n)
		case store.String:
			data[i] = make([]string, 0, n)
		default:
			data[i] = make([]float64, 0, n)
		}
	}
	appF := func(i int, v float64) { data[i] = append(data[i].([]float64), v) }
	nObs := len(p.Observations)
	for chain, b := range bufs {
		for _, d := range b {
			data[0] = append(data[0].([]int64), int64(chain))
			data[1] = append(data[1].([]int64), d.index)
			appF(2, d.der[0])
			appF(3, d.der[1])
			appF(4, d.lp)
			k := 5
			for j, par := range p.Space.Params {
				if cat, ok := problem.CategoricalLabels(par); ok {
					data[k] = append(data[k].([]string), cat[int(d.x[j])])
				} else {
					appF(k, d.x[j]*par.ToUnit)
				}
				k++
			}
			for j, o := range p.Observations {
				appF(k, d.der[2+j]/o.Observable.ToSI())
				k++
			}
			for j := range p.DerivedColumns() {
				appF(k, d.der[2+nObs+j]/1e3)
				k++
			}
		}
	}
	return &store.Batch{Columns: cols, Data: data}
}
