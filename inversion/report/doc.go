// Package report draws the figures of a run folder and writes its one-page Markdown report.
//
// Load takes an opened run folder (package runfolder) and reads the tables a figure needs through
// it, once; every figure function takes the loaded *Run and returns
// a *Figure, which Save renders to PNG, SVG or PDF. All figures are drawn in grey levels only,
// with series told apart by line style, dash pattern and fill level, so they survive greyscale
// printing. Values are shown in the output units of the sample table (km, kg/m3, km/s, …).
package report
