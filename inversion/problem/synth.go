package problem

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"

	"plumb/inversion/mcmc"
)

// SynthRand returns the generator of the synthetic noise for seed. The PCG is seeded with a
// SHA-256 hash of a tag and the seed — not NewPCG(seed, …) — because plumb synth defaults to the
// config's sampler.seed: a generator seeded like a chain's would make the data's noise and that
// chain's moves come from related streams.
func SynthRand(seed uint64) *rand.Rand {
	return rand.New(rand.NewPCG(mcmc.HashSeeds("plumb/synth-seed", seed)))
}

// AddNoise returns pred (SI, in the order of p.Observations) plus Gaussian noise N(0, σ²) with
// each observation's σ, one standard normal draw from r per observation in that order; with r nil
// it returns a copy of pred (noise-free data).
func AddNoise(p *Problem, pred []float64, r *rand.Rand) []float64 {
	out := append([]float64(nil), pred...)
	if r == nil {
		return out
	}
	for i, o := range p.Observations {
		out[i] += o.Sigma * r.NormFloat64()
	}
	return out
}

// ReplaceObservations returns the YAML config src (read from file, built as p) with the value of
// every observation and the time_s of every seismic pick replaced by values (SI, in the order of
// p.Observations), written in the key's unit with the shortest decimal form that round-trips
// (strconv 'g', -1). Everything else — comments, layout, key order, other numbers — is kept byte
// for byte: yaml.v3's node tree locates each value, and only its text is spliced. TOML configs are
// an error (only YAML can be rewritten this way).
func ReplaceObservations(src []byte, file string, p *Problem, values []float64) ([]byte, error) {
	bad := func(key, format string, a ...any) error {
		return &ConfigError{File: file, Key: key, Msg: fmt.Sprintf(format, a...)}
	}
	switch strings.ToLower(filepath.Ext(file)) {
	case ".yaml", ".yml":
	default:
		return nil, bad("", "plumb synth rewrites YAML configs only (convert this one to YAML)")
	}
	if len(values) != len(p.Observations) {
		return nil, fmt.Errorf("synth: %d values for %d observations", len(values), len(p.Observations))
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(src, &doc); err != nil {
		return nil, bad("", "%s", oneLine(err.Error()))
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 {
		return nil, bad("", "not a YAML document with one mapping")
	}
	root := doc.Content[0]
	var targets []*yaml.Node
	var keys []string
	// p.Observations lists the entries of the observations section first (every key there is an
	// observable, or Build would have failed), then the picks in config order of events and picks.
	obsNode := mapValue(root, "observations")
	reg := 0
	if obsNode != nil && obsNode.Kind == yaml.MappingNode {
		reg = min(len(obsNode.Content)/2, len(p.Observations))
	}
	for _, o := range p.Observations[:reg] {
		key := "observations." + o.Observable.Key
		n := mapValue(mapValue(obsNode, o.Observable.Key), "value")
		if n == nil {
			return nil, bad(key+".value", "not found as a plain key in the file (anchors and merge keys are not supported)")
		}
		targets, keys = append(targets, n), append(keys, key+".value")
	}
	events := mapValue(mapValue(root, "seismic"), "events")
	if events != nil && events.Kind == yaml.SequenceNode {
		for i, ev := range events.Content {
			picks := mapValue(ev, "picks")
			if picks == nil || picks.Kind != yaml.SequenceNode {
				continue
			}
			for j, pk := range picks.Content {
				key := fmt.Sprintf("seismic.events[%d].picks[%d].time_s", i, j)
				n := mapValue(pk, "time_s")
				if n == nil {
					return nil, bad(key, "not found as a plain key in the file (anchors and merge keys are not supported)")
				}
				targets, keys = append(targets, n), append(keys, key)
			}
		}
	}
	if len(targets) != len(p.Observations) {
		return nil, bad("", "found %d observation values and pick times in the file, but the config has %d observations (anchors and merge keys are not supported)", len(targets), len(p.Observations))
	}
	lines := lineStarts(src)
	type edit struct {
		at, end int
		text    string
	}
	edits := make([]edit, len(targets))
	for i, n := range targets {
		if n.Kind != yaml.ScalarNode || n.Style != 0 {
			return nil, bad(keys[i], "not a plain number in the file")
		}
		at, ok := offset(src, lines, n.Line, n.Column)
		if !ok || !bytes.HasPrefix(src[at:], []byte(n.Value)) {
			return nil, bad(keys[i], "cannot locate %q in the file", n.Value)
		}
		v := values[i] / p.Observations[i].Observable.ToSI()
		edits[i] = edit{at: at, end: at + len(n.Value), text: strconv.FormatFloat(v, 'g', -1, 64)}
	}
	sort.Slice(edits, func(i, j int) bool { return edits[i].at > edits[j].at })
	out := append([]byte(nil), src...)
	for _, e := range edits {
		out = append(out[:e.at], append([]byte(e.text), out[e.end:]...)...)
	}
	return out, nil
}

// mapValue returns the value node of key in mapping node m (nil if m is not a mapping or lacks
// the key).
func mapValue(m *yaml.Node, key string) *yaml.Node {
	if m == nil || m.Kind != yaml.MappingNode {
		return nil
	}
	for i := 0; i+1 < len(m.Content); i += 2 {
		if m.Content[i].Value == key {
			return m.Content[i+1]
		}
	}
	return nil
}

// lineStarts returns the byte offset at which each line starts.
func lineStarts(src []byte) []int {
	s := []int{0}
	for i, c := range src {
		if c == '\n' {
			s = append(s, i+1)
		}
	}
	return s
}

// offset converts yaml.v3's 1-based line and column — the column counts characters, not
// bytes — into a byte offset.
func offset(src []byte, lines []int, line, col int) (int, bool) {
	if line < 1 || line > len(lines) || col < 1 {
		return 0, false
	}
	at := lines[line-1]
	for k := 1; k < col; k++ {
		if at >= len(src) || src[at] == '\n' {
			return 0, false
		}
		_, w := utf8.DecodeRune(src[at:])
		at += w
	}
	return at, true
}
