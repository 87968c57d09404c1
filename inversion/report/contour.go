package report

import "gonum.org/v1/plot/plotter"

// The plotting library's contour plotter joins its paths through map iteration, so the order
// of the paths in an SVG or PDF changes from one rendering to the next. contourLines is a small
// marching-squares tracer whose output depends only on the grid, which keeps figures
// byte-identical for the same run.

// edgeKey names the edge of the grid between two neighbouring nodes: kind 0 joins (i, j) and
// (i+1, j), kind 1 joins (i, j) and (i, j+1).
type edgeKey struct{ kind, i, j int }

// contourLines returns the closed lines along which the bin-centred grid g crosses level t. The
// grid is padded with a ring of zeros, so for t > 0 every line closes.
func contourLines(g *counts2D, t float64) []plotter.XYs {
	nc, nr := g.Dims()
	// Node (i, j) of the padded grid is bin (i−1, j−1).
	z := func(i, j int) float64 {
		if i < 1 || j < 1 || i > nc || j > nr {
			return 0
		}
		return g.z[i-1][j-1]
	}
	x := func(i int) float64 { return g.X(i - 1) }
	y := func(j int) float64 { return g.Y(j - 1) }
	point := func(e edgeKey) plotter.XY {
		i2, j2 := e.i+1, e.j
		if e.kind == 1 {
			i2, j2 = e.i, e.j+1
		}
		a, b := z(e.i, e.j), z(i2, j2)
		f := (t - a) / (b - a)
		return plotter.XY{X: x(e.i) + f*(x(i2)-x(e.i)), Y: y(e.j) + f*(y(j2)-y(e.j))}
	}
	type segment struct{ a, b edgeKey }
	var segs []segment
	adj := map[edgeKey][]int{}
	add := func(a, b edgeKey) {
		adj[a] = append(adj[a], len(segs))
		adj[b] = append(adj[b], len(segs))
		segs = append(segs, segment{a, b})
	}
	for i := 0; i <= nc; i++ {
		for j := 0; j <= nr; j++ {
			// Corners bottom-left, bottom-right, top-right, top-left and the edges of the square.
			in := [4]bool{z(i, j) >= t, z(i+1, j) >= t, z(i+1, j+1) >= t, z(i, j+1) >= t}
			bottom, right, top, left := edgeKey{0, i, j}, edgeKey{1, i + 1, j}, edgeKey{0, i, j + 1}, edgeKey{1, i, j}
			// cornerEdges[k] are the two edges that cut corner k off the square.
			cornerEdges := [4][2]edgeKey{{bottom, left}, {bottom, right}, {right, top}, {top, left}}
			var crossed []edgeKey
			for k, e := range []edgeKey{bottom, right, top, left} {
				if in[k] != in[(k+1)%4] {
					crossed = append(crossed, e)
				}
			}
			switch len(crossed) {
			case 2:
				add(crossed[0], crossed[1])
			case 4:
				// Saddle: decide by the square's mean which diagonal pair is connected; the
				// corners on the other side of the centre are cut off.
				centre := (z(i, j)+z(i+1, j)+z(i+1, j+1)+z(i, j+1))/4 >= t
				for k := range 4 {
					if in[k] != centre {
						add(cornerEdges[k][0], cornerEdges[k][1])
					}
				}
			}
		}
	}
	used := make([]bool, len(segs))
	var lines []plotter.XYs
	for s := range segs {
		if used[s] {
			continue
		}
		used[s] = true
		line := plotter.XYs{point(segs[s].a), point(segs[s].b)}
		cur := segs[s].b
		for {
			next := -1
			for _, k := range adj[cur] {
				if !used[k] {
					next = k
					break
				}
			}
			if next < 0 {
				break
			}
			used[next] = true
			if segs[next].a == cur {
				cur = segs[next].b
			} else {
				cur = segs[next].a
			}
			line = append(line, point(cur))
		}
		lines = append(lines, line)
	}
	return lines
}
