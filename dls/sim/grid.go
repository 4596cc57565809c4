package sim

import (
	"fmt"
	"math"
)

// GridSpec chooses a multi-tau lag grid. Zero fields take the defaults of
// DefaultGridSpec. When both TauMaxS and Channels are set, TauMaxS wins.
type GridSpec struct {
	// DtS is the sample time of stage 0 in seconds.
	DtS float64
	// M is the number of channels of every stage after the first; stage 0
	// has 2M. Typical values are 8 or 16.
	M int
	// TauMaxS, when positive, ends the grid at the last channel whose lag
	// does not exceed it.
	TauMaxS float64
	// Channels, when positive and TauMaxS is zero, is the total channel
	// count. It need not fill the last stage.
	Channels int
}

// DefaultGridSpec is 25 ns first sample time, 8 channels per stage after a
// first stage of 16, and 200 channels, which ends at about 3.4 s.
func DefaultGridSpec() GridSpec { return GridSpec{DtS: 25e-9, M: 8, Channels: 200} }

// Grid is a multi-tau lag grid. Channel i has lag TauS[i], belongs to stage
// Stage[i] and was correlated at sample time SampleS[i] = 2^Stage[i]·DtS;
// Index[i] = TauS[i]/SampleS[i] is the lag in units of its own sample time.
type Grid struct {
	DtS     float64
	M       int
	TauS    []float64
	SampleS []float64
	Stage   []int
	Index   []int
}

// maxChannels guards against grids no correlator has.
const maxChannels = 4096

// NewGrid builds the lag grid of Schätzel's multi-tau scheme:
//
//	stage 0:      τ = k·dt,            k = 1 … 2M
//	stage s ≥ 1:  τ = (M + j)·2^s·dt,  j = 1 … M
func NewGrid(spec GridSpec) (*Grid, error) {
	def := DefaultGridSpec()
	if spec.DtS == 0 {
		spec.DtS = def.DtS
	}
	if spec.M == 0 {
		spec.M = def.M
	}
	if spec.TauMaxS == 0 && spec.Channels == 0 {
		spec.Channels = def.Channels
	}
	switch {
	case !(spec.DtS > 0) || math.IsInf(spec.DtS, 0):
		return nil, fmt.Errorf("lag grid: sample time %g s is not a positive number", spec.DtS)
	case spec.M < 1 || spec.M > 256:
		return nil, fmt.Errorf("lag grid: %d channels per stage is outside 1…256", spec.M)
	case spec.TauMaxS < 0 || math.IsNaN(spec.TauMaxS) || math.IsInf(spec.TauMaxS, 0):
		return nil, fmt.Errorf("lag grid: longest lag %g s is not a positive number", spec.TauMaxS)
	case spec.Channels < 0:
		return nil, fmt.Errorf("lag grid: channel count %d is negative", spec.Channels)
	case spec.TauMaxS > 0 && spec.TauMaxS < spec.DtS:
		return nil, fmt.Errorf("lag grid: longest lag %g s is shorter than the sample time %g s", spec.TauMaxS, spec.DtS)
	}
	g := &Grid{DtS: spec.DtS, M: spec.M}
	add := func(k, s int) bool {
		ts := math.Ldexp(spec.DtS, s)
		tau := float64(k) * ts
		if spec.TauMaxS > 0 {
			if tau > spec.TauMaxS*(1+1e-12) {
				return false
			}
		} else if len(g.TauS) >= spec.Channels {
			return false
		}
		g.TauS = append(g.TauS, tau)
		g.SampleS = append(g.SampleS, ts)
		g.Stage = append(g.Stage, s)
		g.Index = append(g.Index, k)
		return true
	}
	for k := 1; k <= 2*spec.M; k++ {
		if !add(k, 0) {
			return g, nil
		}
	}
	for s := 1; ; s++ {
		for j := 1; j <= spec.M; j++ {
			if len(g.TauS) >= maxChannels {
				return nil, fmt.Errorf("lag grid: more than %d channels", maxChannels)
			}
			if !add(spec.M+j, s) {
				return g, nil
			}
		}
	}
}

// Len is the number of channels.
func (g *Grid) Len() int { return len(g.TauS) }
