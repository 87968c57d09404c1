package report

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"plumb/forward"
)

// Options select the figures' content and file format.
type Options struct {
	// Params are the columns of the marginal and trace figures (empty: every sampled continuous
	// parameter).
	Params []string
	// Pairs are drawn in the pair figure after the default pair (Run.DefaultPair).
	Pairs []Pair
	// Truth, when not nil, is drawn in the profiles figure (SI units, as from
	// forward.Structure.Profile).
	Truth *forward.Profile
	// Format is png, svg or pdf (empty: png).
	Format string
	// WidthPx and HeightPx are the figure size in pixels (vector formats: at 96 dpi); 0 takes
	// DefaultWidthPx × DefaultHeightPx.
	WidthPx, HeightPx int
}

// Written describes a figure file written by DrawAll.
type Written struct {
	// Name is the figure's name (file stem), Title its title.
	Name, Title string
	// Path is the file written.
	Path string
}

// Check reports the first name in opt that is not a continuous column of the run, as the
// offending name and an error; ("", nil) when every name is known.
func (r *Run) Check(opt Options) (string, error) {
	names := slices.Clone(opt.Params)
	for _, p := range opt.Pairs {
		names = append(names, p.X, p.Y)
	}
	for _, n := range names {
		if _, ok := r.Lookup(n); !ok {
			return n, fmt.Errorf("unknown continuous parameter %q", n)
		}
	}
	return "", nil
}

// Figures builds every figure of the run for opt, in report order: marginals, pairs, profiles,
// traces, categorical levels, observations. Figures the run has nothing for (no profiles table,
// no categorical parameter, fewer than two continuous parameters) are left out, with one line
// each written to notes.
func Figures(r *Run, opt Options, notes io.Writer) ([]*Figure, error) {
	var pairs []Pair
	if x, y, ok := r.DefaultPair(); ok {
		pairs = append(pairs, Pair{X: x, Y: y})
	}
	for _, p := range opt.Pairs {
		if !slices.Contains(pairs, p) {
			pairs = append(pairs, p)
		}
	}
	builders := []struct {
		name string
		f    func() (*Figure, error)
	}{
		{"marginals", func() (*Figure, error) { return Marginals(r, opt.Params) }},
		{"pairs", func() (*Figure, error) {
			if len(pairs) == 0 {
				return nil, fmt.Errorf("fewer than two continuous parameters: %w", ErrNothingToDraw)
			}
			return Pairs(r, pairs)
		}},
		{"profiles", func() (*Figure, error) { return Profiles(r, opt.Truth) }},
		{"traces", func() (*Figure, error) { return Traces(r, opt.Params) }},
		{"levels", func() (*Figure, error) { return Levels(r) }},
		{"observations", func() (*Figure, error) { return Observations(r) }},
	}
	var out []*Figure
	for _, b := range builders {
		f, err := b.f()
		if errors.Is(err, ErrNothingToDraw) {
			fmt.Fprintf(notes, "plumb: skipped the %s figure: %s\n", b.name,
				strings.TrimSuffix(err.Error(), ": "+ErrNothingToDraw.Error()))
			continue
		}
		if err != nil {
			return nil, fmt.Errorf("%s figure: %w", b.name, err)
		}
		out = append(out, f)
	}
	return out, nil
}

// DrawAll builds the figures (see Figures) and saves each to outDir/<name>.<format>, creating
// outDir and replacing figure files of the same name (each written atomically). It returns the
// files written, in order.
func DrawAll(r *Run, outDir string, opt Options, notes io.Writer) ([]Written, error) {
	format := opt.Format
	if format == "" {
		format = "png"
	}
	if !slices.Contains(Formats, format) {
		return nil, fmt.Errorf("unknown figure format %q", format)
	}
	w, h := opt.WidthPx, opt.HeightPx
	if w == 0 && h == 0 {
		w, h = DefaultWidthPx, DefaultHeightPx
	}
	figs, err := Figures(r, opt, notes)
	if err != nil {
		return nil, err
	}
	if err := os.MkdirAll(outDir, 0o755); err != nil {
		return nil, fmt.Errorf("create figure folder: %w", err)
	}
	var out []Written
	for _, f := range figs {
		path := filepath.Join(outDir, f.Name+"."+format)
		if err := f.Save(path, format, w, h); err != nil {
			return out, err
		}
		out = append(out, Written{Name: f.Name, Title: f.Title, Path: path})
	}
	return out, nil
}
