package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"math"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"golang.org/x/term"

	"plumb/forward"
	"plumb/forward/tides"
	"plumb/inversion/modelfile"
	"plumb/inversion/problem"
	"plumb/inversion/results"
	"plumb/inversion/run"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// runOptions builds the execution options: a live line when stderr is a terminal, else log lines.
func runOptions(cmd *cobra.Command, workers int) run.Options {
	errw := cmd.ErrOrStderr()
	opt := run.Options{Workers: workers, Log: slog.New(slog.NewTextHandler(errw, nil))}
	if f, ok := errw.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		opt.Live = errw
	}
	return opt
}

func runCmd() *cobra.Command {
	var out string
	var seed uint64
	var steps, warmup, thin int64
	var chains, workers int
	c := &cobra.Command{
		Use:   "run CONFIG",
		Short: "Sample the posterior of a config and write a run folder",
		Long: "run samples the posterior defined by CONFIG (YAML or TOML) and writes a run folder: the\n" +
			"resolved config, Parquet sample parts, a checkpoint and a summary. Flags override the\n" +
			"config's sampler keys, and so do PLUMB_SAMPLER_<KEY> environment variables.",
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			ov := map[string]any{}
			f := cmd.Flags()
			if f.Changed("seed") {
				ov["sampler.seed"] = seed
			}
			if f.Changed("steps") {
				ov["sampler.steps"] = steps
			}
			if f.Changed("warmup") {
				ov["sampler.warmup_steps"] = warmup
			}
			if f.Changed("thin") {
				ov["sampler.thin"] = thin
			}
			if f.Changed("chains") {
				ov["sampler.chains"] = chains
			}
			if f.Changed("workers") {
				ov["sampler.workers"] = workers
			}
			cfg, err := problem.Load(args[0], configOverrides(ov))
			if err != nil {
				return err
			}
			dir := out
			if dir == "" {
				dir = cfg.Output.Dir
				if !filepath.IsAbs(dir) {
					dir = filepath.Join(filepath.Dir(args[0]), dir)
				}
			}
			rf, err := run.Start(cmd.Context(), cfg, args[0], dir, runOptions(cmd, 0))
			if err != nil {
				if errors.Is(err, run.ErrInterrupted) {
					fmt.Fprintf(cmd.ErrOrStderr(), "checkpoint written; continue with: plumb resume %s\n", dir)
				}
				return err
			}
			return writeSummary(cmd.OutOrStdout(), rf, false)
		},
	}
	f := c.Flags()
	f.StringVar(&out, "out", "", "run folder (must not exist or be empty; default: output.dir of the config)")
	f.Uint64Var(&seed, "seed", 0, "random seed (overrides sampler.seed)")
	f.Int64Var(&steps, "steps", 0, "sweeps per chain after warm-up (overrides sampler.steps)")
	f.Int64Var(&warmup, "warmup", 0, "warm-up sweeps per chain (overrides sampler.warmup_steps)")
	f.Int64Var(&thin, "thin", 0, "keep every n-th sweep (overrides sampler.thin)")
	f.IntVar(&chains, "chains", 0, "number of chains (overrides sampler.chains)")
	f.IntVar(&workers, "workers", 0, "goroutines running chains; does not change the output (overrides sampler.workers)")
	return c
}

// openRunDir opens a run folder; a folder that is not one is an input error.
func openRunDir(dir string) (*runfolder.Folder, error) {
	f, err := runfolder.Open(dir)
	if errors.Is(err, runfolder.ErrNotRunFolder) {
		return nil, inputError{err}
	}
	return f, err
}

func resumeCmd() *cobra.Command {
	var workers int
	c := &cobra.Command{
		Use:   "resume RUN_DIR",
		Short: "Continue an interrupted run exactly where it stopped",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			dir := args[0]
			f, err := openRunDir(dir)
			if err != nil {
				return err
			}
			// A run resumes with its own config: overrides in the environment are not applied
			// (they would change the config's hash and so refuse the resume).
			if _, names := envOverrides(os.LookupEnv); len(names) > 0 {
				fmt.Fprintf(cmd.ErrOrStderr(), "plumb: ignoring %s: a run resumes with its own config (%s)\n",
					strings.Join(names, ", "), filepath.Join(dir, runfolder.ConfigFile))
			}
			if f, err = run.Resume(cmd.Context(), f, runOptions(cmd, workers)); err != nil {
				return err
			}
			return writeSummary(cmd.OutOrStdout(), f, false)
		},
	}
	c.Flags().IntVar(&workers, "workers", 0, "goroutines running chains (default: the run's config); does not change the output")
	return c
}

func summaryCmd() *cobra.Command {
	var asJSON bool
	var markdown, truth string
	c := &cobra.Command{
		Use:   "summary RUN_DIR",
		Short: "Print the posterior of every parameter and of the layer states; write summary.json",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			dir := args[0]
			f, err := openRunDir(dir)
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			if asJSON && truth != "" {
				// One JSON document: {"summary": …, "truth": …}.
				var sb, tb bytes.Buffer
				if err := writeSummary(&sb, f, true); err != nil {
					return err
				}
				if err := summaryTruth(&tb, f, truth, true); err != nil {
					return err
				}
				_, err := fmt.Fprintf(w, "{\"summary\": %s,\n\"truth\": %s}\n", bytes.TrimSpace(sb.Bytes()), bytes.TrimSpace(tb.Bytes()))
				if err != nil {
					return err
				}
			} else {
				if err := writeSummary(w, f, asJSON); err != nil {
					return err
				}
				if truth != "" {
					if err := summaryTruth(w, f, truth, false); err != nil {
						return err
					}
				}
			}
			if markdown != "" {
				return summaryMarkdown(cmd, f, markdown)
			}
			return nil
		},
	}
	c.Flags().BoolVar(&asJSON, "json", false, "print JSON instead of tables")
	c.Flags().StringVar(&markdown, "markdown", "", "also write a one-page Markdown report (tables and figures) to this file")
	c.Flags().StringVar(&truth, "truth", "", "truth model of a synthetic run: report the posterior quantile at which each true value falls")
	return c
}

// writeSummary summarises an opened run folder, saves summary.json in it and prints the tables
// (or JSON).
func writeSummary(w io.Writer, f *runfolder.Folder, asJSON bool) error {
	s, err := results.Summarize(f)
	if err != nil {
		return err
	}
	b, err := s.JSON()
	if err != nil {
		return err
	}
	if err := store.WriteFileAtomic(filepath.Join(f.Dir, runfolder.SummaryFile), b, 0o644); err != nil {
		return fmt.Errorf("write summary: %w", err)
	}
	if asJSON {
		_, err = w.Write(b)
		return err
	}
	return s.WriteText(w)
}

func checkCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "check CONFIG",
		Short: "Validate a config and print its parameters and observations without sampling",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			cfg, err := problem.Load(args[0], configOverrides(nil))
			if err != nil {
				return err
			}
			p, err := problem.Build(cfg, args[0])
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			fmt.Fprintf(w, "%s: valid. Planet %q, %d layers, %d sampled parameters, %d observations.\n\n",
				args[0], cfg.Planet.Name, len(cfg.Layers), p.Dim(), len(p.Observations))
			tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
			fmt.Fprintln(tw, "parameter\tunit\tprior\tsupport")
			for _, par := range p.Space.Params {
				lo, hi := par.Prior.Support()
				sup := fmt.Sprintf("[%.6g, %.6g]", lo*par.ToUnit, hi*par.ToUnit)
				if par.Levels() > 0 {
					sup = fmt.Sprintf("%d levels", par.Levels())
				}
				fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", par.Name, par.Unit, par.PriorString(), sup)
			}
			tw.Flush()
			fmt.Fprintln(w)
			tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
			fmt.Fprintln(tw, "observation\tunit\tvalue\tsigma")
			for _, o := range p.Observations {
				si := o.Observable.ToSI()
				fmt.Fprintf(tw, "%s\t%s\t%.8g\t%.4g\n", o.Observable.Key, o.Observable.Unit, o.Value/si, o.Sigma/si)
			}
			tw.Flush()
			s := cfg.Sampler
			fmt.Fprintf(w, "\nsampler: %d chains × (%d warm-up + %d steps), thin %d → %d draws per chain; seed %d\n",
				s.Chains, s.WarmupSteps, s.Steps, s.Thin, s.Steps/s.Thin, s.Seed)
			fmt.Fprintf(w, "moves: random walk, independence share %g", s.Independence)
			if s.EventBlocks {
				fmt.Fprint(w, ", a block per seismic event")
			}
			if t := s.Tempering; t != nil {
				fmt.Fprintf(w, "; tempering with %d replicas per chain", t.Replicas)
			} else if s.Anneal > 0 && !s.PriorOnly {
				fmt.Fprintf(w, "; likelihood annealed in over the first %g of warm-up", s.Anneal)
			}
			if s.PoolWarmup && s.Chains > 1 && s.Independence > 0 {
				fmt.Fprint(w, "; independence proposal fitted to all chains' warm-up")
			}
			if s.PriorOnly {
				fmt.Fprint(w, "; PRIOR ONLY (likelihood off)")
			}
			if st := s.Stop; st != nil {
				fmt.Fprintf(w, "; stop when R̂ < %g and bulk-ESS > %g", st.RHatBelow, st.ESSAbove)
			}
			fmt.Fprintln(w)
			return nil
		},
	}
}

// forwardResult is the JSON printed by plumb forward.
type forwardResult struct {
	RadiusKm          float64   `json:"radius_km"`
	MassKg            float64   `json:"mass_kg"`
	MeanDensityKgM3   float64   `json:"mean_density_kg_m3"`
	SurfaceGravityMS2 float64   `json:"surface_gravity_m_s2"`
	MoIFactor         float64   `json:"moi_factor"`
	CentralPressurePa float64   `json:"central_pressure_pa"`
	Layers            int       `json:"layers"`
	Love              *loveJSON `json:"love,omitempty"`
	// Core and TravelTimes are present with --phases.
	Core        *coreJSON        `json:"core,omitempty"`
	TravelTimes []travelTimeJSON `json:"travel_times,omitempty"`
}

// coreJSON gives the core boundaries the travel times were computed with.
type coreJSON struct {
	CMBRadiusKm float64 `json:"cmb_radius_km"`
	ICBRadiusKm float64 `json:"icb_radius_km"` // 0: no inner core
}

// travelTimeJSON lists the arrivals of one phase at one distance, earliest first (empty when
// the phase does not exist there).
type travelTimeJSON struct {
	Phase         string        `json:"phase"`
	DistanceDeg   float64       `json:"distance_deg"`
	SourceDepthKm float64       `json:"source_depth_km"`
	Arrivals      []arrivalJSON `json:"arrivals"`
}

// arrivalJSON is one ray: travel time and ray parameter p = dT/dΔ (positive; a ray arriving the
// long way round has major_arc set).
type arrivalJSON struct {
	TimeS               float64 `json:"time_s"`
	RayParameterSPerDeg float64 `json:"ray_parameter_s_per_deg"`
	First               bool    `json:"first"`
	MajorArc            bool    `json:"major_arc,omitempty"`
	BottomRadiusKm      float64 `json:"bottom_radius_km"`
}

// loveJSON holds Love numbers: static elastic ones, and with a forcing period the complex k
// (real, imaginary part and Q = |k|/|Im k|); l is null when undefined (a fluid surface).
type loveJSON struct {
	Degree  int      `json:"degree"`
	K       float64  `json:"k"`
	H       float64  `json:"h"`
	L       *float64 `json:"l"`
	PeriodH *float64 `json:"period_h,omitempty"`
	KReal   *float64 `json:"k_real,omitempty"`
	KImag   *float64 `json:"k_imag,omitempty"`
	Q       *float64 `json:"q,omitempty"`
}

func forwardCmd() *cobra.Command {
	var model, profile string
	var asJSON bool
	var perLayer, degree int
	var periodH, stepKm float64
	var tt travelTimeFlags
	c := &cobra.Command{
		Use:   "forward --model FILE",
		Short: "Evaluate one interior model (tabulated CSV or layered YAML)",
		Long: "forward reads a tabulated model (CSV with header radius_km,density_kg_m3,vp_km_s,vs_km_s and an\n" +
			"optional viscosity_pa_s column; rows from the centre out; a discontinuity is two rows at one\n" +
			"radius; vs = 0 marks a fluid) and prints its mass, mean density, surface gravity, moment of\n" +
			"inertia factor and central pressure. A .yaml/.toml FILE is a layered model instead: the planet\n" +
			"and layers sections of a run config with every value fixed.",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if model == "" {
				return usageError{fmt.Errorf("forward: --model FILE is required")}
			}
			st, rheologies, err := solveModelFile(model)
			if err != nil {
				return err
			}
			r, err := newForwardResult(st)
			if err != nil {
				return fmt.Errorf("%s: %w", model, err)
			}
			if degree > 0 {
				lv, err := loveNumbers(st, degree, periodH, rheologies)
				if err != nil {
					return inputError{fmt.Errorf("%s: Love numbers: %w", model, err)}
				}
				r.Love = lv
			}
			if len(tt.phases) > 0 {
				if r.Core, r.TravelTimes, err = tt.compute(cmd, st); err != nil {
					return err
				}
			}
			if profile != "" {
				prof := st.Profile(perLayer)
				if cmd.Flags().Changed("radius-step-km") {
					grid := forward.RadiusGrid(st.Radius(), stepKm*1e3)
					if grid == nil || len(grid) > 1e6 {
						return usageError{fmt.Errorf("--radius-step-km %g: want a step > 0 km giving at most 10⁶ radii", stepKm)}
					}
					prof = st.ProfileAt(grid)
				}
				if err := writeProfile(profile, prof); err != nil {
					return err
				}
			}
			w := cmd.OutOrStdout()
			if asJSON {
				b, err := json.MarshalIndent(r, "", "  ")
				if err != nil {
					return err
				}
				_, err = fmt.Fprintf(w, "%s\n", b)
				return err
			}
			tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
			fmt.Fprintf(tw, "radius\t%.6g km\n", r.RadiusKm)
			fmt.Fprintf(tw, "mass\t%.6g kg\n", r.MassKg)
			fmt.Fprintf(tw, "mean density\t%.6g kg/m3\n", r.MeanDensityKgM3)
			fmt.Fprintf(tw, "surface gravity\t%.6g m/s2\n", r.SurfaceGravityMS2)
			fmt.Fprintf(tw, "moment of inertia factor I/(MR²)\t%.6g\n", r.MoIFactor)
			fmt.Fprintf(tw, "central pressure\t%.6g GPa\n", r.CentralPressurePa/1e9)
			if lv := r.Love; lv != nil {
				ls := "undefined (fluid surface)"
				if lv.L != nil {
					ls = fmt.Sprintf("%.6g", *lv.L)
				}
				fmt.Fprintf(tw, "Love numbers, degree %d (static, elastic)\tk %.6g  h %.6g  l %s\n", lv.Degree, lv.K, lv.H, ls)
				if lv.PeriodH != nil {
					q := "∞ (no dissipation)"
					if lv.Q != nil {
						q = fmt.Sprintf("%.4g", *lv.Q)
					}
					fmt.Fprintf(tw, "k at %g h (Maxwell where a viscosity is given)\t%.6g %+.3gi  Q %s\n", *lv.PeriodH, *lv.KReal, *lv.KImag, q)
				}
			}
			if r.Core != nil {
				fmt.Fprintf(tw, "core–mantle boundary\t%.6g km (inner-core boundary %.6g km)\n", r.Core.CMBRadiusKm, r.Core.ICBRadiusKm)
			}
			for _, t := range r.TravelTimes {
				if len(t.Arrivals) == 0 {
					fmt.Fprintf(tw, "%s at %g°, depth %g km\tno arrival\n", t.Phase, t.DistanceDeg, t.SourceDepthKm)
				}
				for _, a := range t.Arrivals {
					first := ""
					if a.First {
						first = "  (first)"
					}
					fmt.Fprintf(tw, "%s at %g°, depth %g km\t%.3f s  p %.4f s/deg%s\n", t.Phase, t.DistanceDeg, t.SourceDepthKm,
						a.TimeS, a.RayParameterSPerDeg, first)
				}
			}
			return tw.Flush()
		},
	}
	f := c.Flags()
	tt.register(f)
	f.StringVar(&model, "model", "", "model file: tabulated .csv, or layered .yaml/.toml")
	f.BoolVar(&asJSON, "json", false, "print JSON")
	f.StringVar(&profile, "profile", "", "also write the solved radius/density/vp/vs/g/P profile to this CSV file")
	f.IntVar(&perLayer, "nodes-per-layer", 2, "profile nodes per layer (with --profile)")
	f.Float64Var(&stepKm, "radius-step-km", 0, "with --profile: sample on the fixed grid 0, step, 2·step, … and the surface instead (a boundary radius takes the layer below), as a run's profile table does")
	f.IntVar(&degree, "degree", 2, "degree of the tidal Love numbers (0: skip them)")
	f.Float64Var(&periodH, "period-h", 0, "tidal forcing period in hours: adds the complex k and Q, layers with a viscosity responding as Maxwell bodies")
	return c
}

// newForwardResult fills the bulk quantities from the observable registry (the code an inversion
// predicts them with) and the central pressure.
func newForwardResult(st *forward.Structure) (forwardResult, error) {
	r := forwardResult{CentralPressurePa: st.CentralPressure(), Layers: len(st.Model.Layers)}
	vals, err := problem.StructureValues(st)
	if err != nil {
		return r, err
	}
	for _, v := range vals {
		switch v.Key {
		case "radius_km":
			r.RadiusKm = v.Output
		case "mass_kg":
			r.MassKg = v.Output
		case "mean_density_kg_m3":
			r.MeanDensityKgM3 = v.Output
		case "surface_gravity_m_s2":
			r.SurfaceGravityMS2 = v.Output
		case "moi_factor":
			r.MoIFactor = v.Output
		}
	}
	return r, nil
}

// loveNumbers computes the static elastic Love numbers of degree n and, for periodH > 0, the
// complex k at that period with the model's tidal rheologies (rheologies gives them: a layered
// model's rheology keys, or for a tabulated model the default rheology of every layer with a
// viscosity).
func loveNumbers(st *forward.Structure, n int, periodH float64, rheologies func() ([]tides.Rheology, error)) (*loveJSON, error) {
	k, h, l, err := tides.Love(st, n)
	if err != nil {
		return nil, err
	}
	lv := &loveJSON{Degree: n, K: k, H: h}
	if !math.IsNaN(l) {
		lv.L = &l
	}
	if periodH == 0 {
		return lv, nil
	}
	if !(periodH > 0) {
		return nil, fmt.Errorf("--period-h %g is not a positive period", periodH)
	}
	rh, err := rheologies()
	if err != nil {
		return nil, err
	}
	kc, _, _, err := tides.ComplexLove(st, n, periodH*3600, rh)
	if err != nil {
		return nil, err
	}
	re, im, q := real(kc), imag(kc), tides.QualityFactor(kc)
	lv.PeriodH, lv.KReal, lv.KImag = &periodH, &re, &im
	if !math.IsInf(q, 0) {
		lv.Q = &q
	}
	return lv, nil
}

// solveModelFile reads a tabulated CSV model or a layered YAML/TOML model (the planet and layers
// sections of a config, all values fixed) and solves its structure; rheologies gives the tidal
// rheology of its layers.
func solveModelFile(path string) (st *forward.Structure, rheologies func() ([]tides.Rheology, error), err error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".yaml", ".yml", ".toml":
		p, err := problem.LoadModel(path)
		if err != nil {
			return nil, nil, err
		}
		st, err := p.Solve(nil)
		if err != nil {
			return nil, nil, inputError{fmt.Errorf("%s: not a physical model: %w", path, err)}
		}
		return st, func() ([]tides.Rheology, error) { return p.Rheologies(st, nil) }, nil
	}
	m, err := modelfile.ReadCSVFile(path)
	if err != nil {
		return nil, nil, inputError{err}
	}
	if st, err = forward.Solve(m); err != nil {
		return nil, nil, inputError{fmt.Errorf("%s: %w", path, err)}
	}
	return st, func() ([]tides.Rheology, error) { return problem.TableRheologies(st), nil }, nil
}

// writeProfile writes a profile CSV atomically, refusing to overwrite an existing file.
func writeProfile(path string, p forward.Profile) error {
	if _, err := os.Stat(path); err == nil {
		return inputError{fmt.Errorf("%s: exists; not overwriting", path)}
	}
	var b bytes.Buffer
	if err := modelfile.WriteProfileCSV(&b, p); err != nil {
		return fmt.Errorf("write profile %s: %w", path, err)
	}
	if err := store.WriteFileAtomic(path, b.Bytes(), 0o644); err != nil {
		return fmt.Errorf("write profile: %w", err)
	}
	return nil
}
