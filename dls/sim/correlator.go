package sim

import (
	"errors"
	"fmt"
	"math"
)

// Correlator is a software multi-tau photon correlator with symmetric
// normalisation. It is fed the photon counts of consecutive base bins of
// length Grid.DtS (Push) and returns, for every channel of its grid, the
// estimate
//
//	g2(τ_c) = (1/N)·Σ_j n(j)·n(j+k)  /  [ (1/N)·Σ_j n(j) · (1/N)·Σ_j n(j+k) ]
//
// where n are the counts of the channel's stage (stage s sums 2^s base
// bins: each stage adds pairs of samples of the stage before, as in
// Schätzel's multi-tau scheme), k = Grid.Index[c] is the lag in samples of
// that stage, the sums run over j = 0 … N−1 and N = (samples of the stage)
// − k is the number of lag products. The first sum of the denominator is
// the direct (early) monitor, the second the delayed (late) one; a
// correlator normalised by the squared mean of the whole run instead would
// see the fluctuations of the mean intensity as noise at the baseline.
// Samples of a stage whose pair is incomplete at the end of the run are not
// used. Counts, products and monitor sums are kept as exact integers, so the
// result does not depend on the order of floating-point operations.
//
// A Correlator is not safe for concurrent use.
type Correlator struct {
	grid   *Grid
	stages []corrStage
	acc    []int64 // pending first sample of the next pair, per stage
	half   []bool  // whether acc holds a pending sample
}

// corrStage is one stage of the correlator.
type corrStage struct {
	lags  []int   // lag indices at this stage, increasing
	chans []int   // grid channel of each lag
	lo    int     // first lag when the lags are the contiguous run lo … k, else 0
	k     int     // longest lag of the stage (0: the stage only bins)
	hist  []int64 // last k samples, stored twice: hist[pos+k−j] is j samples back
	pos   int
	prod  []int64 // Σ n(j)·n(j+lag) per lag
	first []int64 // the first k samples
	n     int64   // samples seen
	total int64   // Σ n over all samples
}

// NewCorrelator returns a correlator for the channels of g. Every channel
// must have a lag that is Index·2^Stage base bins (as NewGrid builds them);
// channels may come in any order and stages may be left without channels.
func NewCorrelator(g *Grid) (*Correlator, error) {
	if g == nil || g.Len() == 0 {
		return nil, errors.New("correlator: lag grid has no channel")
	}
	if len(g.SampleS) != g.Len() || len(g.Stage) != g.Len() || len(g.Index) != g.Len() {
		return nil, errors.New("correlator: lag grid slices differ in length")
	}
	if !(g.DtS > 0) || math.IsInf(g.DtS, 0) {
		return nil, fmt.Errorf("correlator: sample time %g s is not a positive number", g.DtS)
	}
	top := 0
	for c := range g.TauS {
		s, k := g.Stage[c], g.Index[c]
		switch {
		case s < 0 || s > 62:
			return nil, fmt.Errorf("correlator: channel %d: stage %d is outside 0…62", c, s)
		case k < 1 || k > 1<<16:
			return nil, fmt.Errorf("correlator: channel %d: lag index %d is outside 1…65536", c, k)
		}
		ts := math.Ldexp(g.DtS, s)
		if math.Abs(g.SampleS[c]-ts) > 1e-9*ts || math.Abs(g.TauS[c]-float64(k)*ts) > 1e-9*float64(k)*ts {
			return nil, fmt.Errorf("correlator: channel %d: lag %g s at sample time %g s is not index %d at stage %d of %g s", c, g.TauS[c], g.SampleS[c], k, s, g.DtS)
		}
		top = max(top, s)
	}
	cr := &Correlator{grid: g, stages: make([]corrStage, top+1), acc: make([]int64, top+1), half: make([]bool, top+1)}
	for c := range g.TauS {
		st := &cr.stages[g.Stage[c]]
		st.lags = append(st.lags, g.Index[c])
		st.chans = append(st.chans, c)
	}
	for s := range cr.stages {
		st := &cr.stages[s]
		// Sort the stage's lags (insertion sort: a stage has few channels).
		for i := 1; i < len(st.lags); i++ {
			for j := i; j > 0 && st.lags[j] < st.lags[j-1]; j-- {
				st.lags[j], st.lags[j-1] = st.lags[j-1], st.lags[j]
				st.chans[j], st.chans[j-1] = st.chans[j-1], st.chans[j]
			}
		}
		for i := 1; i < len(st.lags); i++ {
			if st.lags[i] == st.lags[i-1] {
				return nil, fmt.Errorf("correlator: channels %d and %d have the same lag", st.chans[i-1], st.chans[i])
			}
		}
		if len(st.lags) > 0 {
			st.k = st.lags[len(st.lags)-1]
		}
		if len(st.lags) > 0 && st.lags[0]+len(st.lags)-1 == st.k {
			st.lo = st.lags[0]
		}
		st.hist = make([]int64, 2*st.k)
		st.prod = make([]int64, len(st.lags))
		st.first = make([]int64, st.k)
	}
	return cr, nil
}

// Grid returns the correlator's lag grid.
func (cr *Correlator) Grid() *Grid { return cr.grid }

// Reset clears all counts, so the correlator starts a new run.
func (cr *Correlator) Reset() {
	for s := range cr.stages {
		st := &cr.stages[s]
		clear(st.hist)
		clear(st.prod)
		clear(st.first)
		st.pos, st.n, st.total = 0, 0, 0
		cr.acc[s], cr.half[s] = 0, false
	}
}

// Bins is the number of base bins pushed since the last Reset.
func (cr *Correlator) Bins() int64 { return cr.stages[0].n }

// Counts is the number of counts pushed since the last Reset.
func (cr *Correlator) Counts() int64 { return cr.stages[0].total }

// Push adds the count of the next base bin. It panics on a negative count.
func (cr *Correlator) Push(n int64) {
	if n < 0 {
		panic("sim: negative photon count")
	}
	for s := 0; ; s++ {
		cr.stages[s].push(n)
		if s+1 == len(cr.stages) {
			return
		}
		if !cr.half[s] {
			cr.acc[s], cr.half[s] = n, true
			return
		}
		n += cr.acc[s]
		cr.half[s] = false
	}
}

func (st *corrStage) push(n int64) {
	k := st.k
	if k == 0 {
		st.n++
		st.total += n
		return
	}
	if n != 0 {
		if st.lo > 0 {
			// seg[len(seg)−1−i] is lo + i samples back.
			seg := st.hist[st.pos : st.pos+k-st.lo+1]
			prod := st.prod[:len(seg)]
			for i := range prod {
				prod[i] += n * seg[len(seg)-1-i]
			}
		} else {
			win := st.hist[st.pos : st.pos+k]
			for i, j := range st.lags {
				st.prod[i] += n * win[k-j]
			}
		}
	}
	if st.n < int64(k) {
		st.first[st.n] = n
	}
	st.hist[st.pos] = n
	st.hist[st.pos+k] = n
	st.pos++
	if st.pos == k {
		st.pos = 0
	}
	st.n++
	st.total += n
}

// G2 writes the symmetrically normalised estimate of every channel of the
// grid into dst (allocated when nil or too short) and returns it. It
// returns an error when a channel has no lag product or a monitor sum is
// zero (no counts in its direct or delayed window).
func (cr *Correlator) G2(dst []float64) ([]float64, error) {
	if len(dst) < cr.grid.Len() {
		dst = make([]float64, cr.grid.Len())
	}
	dst = dst[:cr.grid.Len()]
	for s := range cr.stages {
		st := &cr.stages[s]
		if st.k == 0 {
			continue
		}
		win := st.hist[st.pos : st.pos+st.k] // win[k−j] is the sample j back from the end
		for i, j := range st.lags {
			c := st.chans[i]
			np := st.n - int64(j)
			if np < 1 {
				return nil, fmt.Errorf("correlator: channel %d (lag %.4g s): no lag product in %d samples", c, cr.grid.TauS[c], st.n)
			}
			var head, tail int64
			for q := 0; q < j; q++ {
				head += st.first[q]
				tail += win[st.k-1-q]
			}
			direct, delayed := st.total-tail, st.total-head
			if direct == 0 || delayed == 0 {
				return nil, fmt.Errorf("correlator: channel %d (lag %.4g s): no counts in the direct or delayed window", c, cr.grid.TauS[c])
			}
			dst[c] = float64(st.prod[i]) * float64(np) / (float64(direct) * float64(delayed))
		}
	}
	return dst, nil
}
