package inversion

import (
	"plumb/inversion/store"
)

// Column names every sample table has. chain and draw are 0-based.
const (
	ColChain         = "chain"
	ColDraw          = "draw"
	ColLogPrior      = "log_prior"
	ColLogLikelihood = "log_likelihood"
	ColLogPosterior  = "log_posterior"
)

// PredictionPrefix starts the column name of a predicted observable, e.g. "pred_mass_kg".
const PredictionPrefix = "pred_"

// columns lays out the sample table of a problem: fixed columns, then one per parameter (in
// output units; categorical parameters as their label), one per predicted observable and one per
// derived layer radius.
type columns struct {
	p    *Problem
	cols []store.Column
}

func newColumns(p *Problem) *columns {
	c := &columns{p: p}
	add := func(name string, k store.Kind, unit string) {
		c.cols = append(c.cols, store.Column{Name: name, Kind: k, Unit: unit})
	}
	add(ColChain, store.Int64, "")
	add(ColDraw, store.Int64, "")
	add(ColLogPrior, store.Float64, "")
	add(ColLogLikelihood, store.Float64, "")
	add(ColLogPosterior, store.Float64, "")
	for _, par := range p.Space.Params {
		if par.Levels() > 0 {
			add(par.Name, store.String, "")
		} else {
			add(par.Name, store.Float64, par.Unit)
		}
	}
	for _, o := range p.Observations {
		add(PredictionPrefix+o.Observable.Key, store.Float64, o.Observable.Unit)
	}
	for _, n := range p.derivedCol {
		add(n, store.Float64, "km")
	}
	return c
}

// batch converts buffered draws (per chain) into a columnar batch in chain-then-draw order.
func (c *columns) batch(bufs [][]draw) *store.Batch {
	n := 0
	for _, b := range bufs {
		n += len(b)
	}
	data := make([]any, len(c.cols))
	for i, col := range c.cols {
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
	nObs := len(c.p.Observations)
	for chain, b := range bufs {
		for _, d := range b {
			data[0] = append(data[0].([]int64), int64(chain))
			data[1] = append(data[1].([]int64), d.index)
			appF(2, d.der[0])
			appF(3, d.der[1])
			appF(4, d.lp)
			k := 5
			for j, par := range c.p.Space.Params {
				if cat, ok := categoricalLabels(par); ok {
					data[k] = append(data[k].([]string), cat[int(d.x[j])])
				} else {
					appF(k, d.x[j]*par.ToUnit)
				}
				k++
			}
			for j, o := range c.p.Observations {
				appF(k, d.der[2+j]/o.Observable.ToSI())
				k++
			}
			for j := range c.p.derivedCol {
				appF(k, d.der[2+nObs+j]/1e3)
				k++
			}
		}
	}
	return &store.Batch{Columns: c.cols, Data: data}
}
