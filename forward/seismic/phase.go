package seismic

import (
	"fmt"
	"strconv"
)

// Phase is a parsed seismic phase name (see the package documentation for the
// phases supported and their conventions). The zero Phase is not a valid
// phase; Arrivals rejects it.
type Phase struct {
	id uint8 // index into phases; 0 = invalid
}

// wave is the type of a leg: compressional or shear.
type wave uint8

const (
	waveP wave = iota
	waveS
)

// turnKind says in which region a phase's turning leg turns.
type turnKind uint8

const (
	turnNone   turnKind = iota // no turning leg (core reflections, up-going rays)
	turnMantle                 // P or S leg turning in the mantle (wave given by phaseSpec.turnWave)
	turnOuter                  // K leg turning in the outer core
	turnInner                  // I leg turning in the inner core
)

// srcKind says how the leg at the source is treated for a source at depth.
type srcKind uint8

const (
	srcDown  srcKind = iota // the ray leaves the source downwards: subtract the source-to-surface leg
	srcDepth                // depth phase (pP, sS): an up-going leg to the surface is added
	srcUp                   // direct up-going ray (p, s): only the source-to-surface leg
)

// phaseSpec describes a phase as a sum of one-way legs: Δ(p) and T(p) are
// nTurn × (turning leg) + nPm × (mantle P leg CMB→surface) + nSm × (mantle S
// leg) + nK × (outer-core P leg ICB→CMB), corrected for the source depth
// according to src (whose leg has wave type srcWave).
type phaseSpec struct {
	name         string
	turn         turnKind
	turnWave     wave // for turnMantle
	nTurn        float64
	nPm, nSm, nK float64
	src          srcKind
	srcWave      wave
	table        int     // index of the sampled table of the phase's family (-1: none)
	tableScale   float64 // phase Δ = tableScale × table Δ for a surface source
}

// Indices of the sampled tables (one per family of phases that share the
// shape of Δ(p) for a surface source).
const (
	tabPm = iota
	tabSm
	tabPKP
	tabSKS
	tabSKKS
	tabPKIKP
	tabPcP
	tabScS
	tabScP
	nTables
)

// phases lists the supported phases; index 0 is the invalid zero Phase.
var phases = [...]phaseSpec{
	{name: ""},
	{name: "P", turn: turnMantle, turnWave: waveP, nTurn: 2, src: srcDown, srcWave: waveP, table: tabPm, tableScale: 1},
	{name: "S", turn: turnMantle, turnWave: waveS, nTurn: 2, src: srcDown, srcWave: waveS, table: tabSm, tableScale: 1},
	{name: "PP", turn: turnMantle, turnWave: waveP, nTurn: 4, src: srcDown, srcWave: waveP, table: tabPm, tableScale: 2},
	{name: "SS", turn: turnMantle, turnWave: waveS, nTurn: 4, src: srcDown, srcWave: waveS, table: tabSm, tableScale: 2},
	{name: "PcP", nPm: 2, src: srcDown, srcWave: waveP, table: tabPcP, tableScale: 1},
	{name: "ScS", nSm: 2, src: srcDown, srcWave: waveS, table: tabScS, tableScale: 1},
	{name: "ScP", nPm: 1, nSm: 1, src: srcDown, srcWave: waveS, table: tabScP, tableScale: 1},
	{name: "PcS", nPm: 1, nSm: 1, src: srcDown, srcWave: waveP, table: tabScP, tableScale: 1},
	{name: "SKS", turn: turnOuter, nTurn: 2, nSm: 2, src: srcDown, srcWave: waveS, table: tabSKS, tableScale: 1},
	{name: "SKKS", turn: turnOuter, nTurn: 4, nSm: 2, src: srcDown, srcWave: waveS, table: tabSKKS, tableScale: 1},
	{name: "PKP", turn: turnOuter, nTurn: 2, nPm: 2, src: srcDown, srcWave: waveP, table: tabPKP, tableScale: 1},
	{name: "PKIKP", turn: turnInner, nTurn: 2, nPm: 2, nK: 2, src: srcDown, srcWave: waveP, table: tabPKIKP, tableScale: 1},
	{name: "pP", turn: turnMantle, turnWave: waveP, nTurn: 2, src: srcDepth, srcWave: waveP, table: tabPm, tableScale: 1},
	{name: "sS", turn: turnMantle, turnWave: waveS, nTurn: 2, src: srcDepth, srcWave: waveS, table: tabSm, tableScale: 1},
	{name: "p", src: srcUp, srcWave: waveP, table: -1},
	{name: "s", src: srcUp, srcWave: waveS, table: -1},
}

// tableBase is, for each table, the phase whose surface-source Δ(p) it samples.
var tableBase = [nTables]uint8{tabPm: 1, tabSm: 2, tabPKP: 11, tabSKS: 9, tabSKKS: 10, tabPKIKP: 12,
	tabPcP: 5, tabScS: 6, tabScP: 7}

// ParsePhase returns the phase with the given IASPEI name. Names are case
// sensitive ("p" is the up-going P ray, "P" the mantle-turning one). The
// supported names are P, S, PP, SS, PcP, ScS, ScP, PcS, SKS, SKKS, PKP,
// PKIKP, pP, sS, p and s.
func ParsePhase(name string) (Phase, error) {
	for i := 1; i < len(phases); i++ {
		if phases[i].name == name {
			return Phase{id: uint8(i)}, nil
		}
	}
	return Phase{}, fmt.Errorf("seismic: unknown phase %s", strconv.Quote(name))
}

// String returns the IASPEI name of the phase ("" for the zero Phase).
func (ph Phase) String() string {
	if int(ph.id) >= len(phases) {
		return ""
	}
	return phases[ph.id].name
}

// spec returns the description of a valid phase.
func (ph Phase) spec() (*phaseSpec, bool) {
	if ph.id == 0 || int(ph.id) >= len(phases) {
		return nil, false
	}
	return &phases[ph.id], true
}
