package sim

import (
	"math"
	"math/rand/v2"
	"sync"
)

// normalSource draws standard normal deviates from a PCG generator
// (math/rand/v2) by the ziggurat method with 128 layers (G. Marsaglia,
// W. W. Tsang, "The ziggurat method for generating random variables",
// J. Stat. Softw. 5(8), 2000), in blocks, so the photon simulation's hot
// loop reads a slice instead of calling a generator per deviate (about half
// the cost of rand.Rand.NormFloat64 per deviate on the development
// machine). Each deviate takes its layer from bits 32–38 of a 64-bit draw
// and its signed abscissa from the low 32 bits, so the two are independent
// (the defect found in the original implementation came from using the
// same bits for both: P. H. W. Leong, G. Zhang, D.-U. Lee, W. Luk,
// J. D. Villasenor, "A comment on the implementation of the ziggurat
// method", J. Stat. Softw. 12(7), 2005).
type normalSource struct {
	src *rand.PCG
	buf []float64
	pos int
}

// newNormalSource returns a source whose take hands out up to block
// deviates at a time.
func newNormalSource(src *rand.PCG, block int) *normalSource {
	n := block * max(8, (256+block-1)/block) // a multiple of the block
	return &normalSource{src: src, buf: make([]float64, n), pos: n}
}

// take returns the next n deviates (n at most the block size given to
// newNormalSource). The slice is valid until the next call.
func (z *normalSource) take(n int) []float64 {
	if z.pos+n > len(z.buf) {
		z.fill()
	}
	s := z.buf[z.pos : z.pos+n]
	z.pos += n
	return s
}

// Ziggurat tables: kn are the acceptance bounds of the 32-bit abscissa, wn
// the abscissa scale and fn the density exp(−x²/2) at each layer's edge.
var zig struct {
	once   sync.Once
	kn     [128]uint32
	wn, fn [128]float64
}

// zigR is where the tail begins and zigV the area of each layer, for 128
// layers (Marsaglia & Tsang 2000).
const (
	zigR = 3.442619855899
	zigV = 9.91256303526217e-3
)

func zigSetup() {
	const m1 = 1 << 31
	dn, tn := zigR, zigR
	q := zigV / math.Exp(-0.5*dn*dn)
	zig.kn[0] = uint32(dn / q * m1)
	zig.kn[1] = 0
	zig.wn[0] = q / m1
	zig.wn[127] = dn / m1
	zig.fn[0] = 1
	zig.fn[127] = math.Exp(-0.5 * dn * dn)
	for i := 126; i >= 1; i-- {
		dn = math.Sqrt(-2 * math.Log(zigV/dn+math.Exp(-0.5*dn*dn)))
		zig.kn[i+1] = uint32(dn / tn * m1)
		tn = dn
		zig.fn[i] = math.Exp(-0.5 * dn * dn)
		zig.wn[i] = dn / m1
	}
}

// fill refills the whole buffer, keeping the unused tail's place.
func (z *normalSource) fill() {
	zig.once.Do(zigSetup)
	p := *z.src // a local copy stays in registers
	for k := range z.buf {
		u := p.Uint64()
		j := int32(uint32(u))
		i := (u >> 32) & 127
		m := j >> 31
		if uint32((j^m)-m) < zig.kn[i] { // |j|, branch-free
			z.buf[k] = float64(j) * zig.wn[i]
			continue
		}
		z.buf[k] = zigSlow(&p, j, i)
	}
	*z.src = p
	z.pos = 0
}

// zigUniform returns a deviate in (0, 1).
func zigUniform(p *rand.PCG) float64 {
	return (float64(p.Uint64()>>11) + 0.5) * 0x1p-53
}

// zigSlow handles a draw outside its layer's rectangle: the tail beyond
// zigR for the base layer (Marsaglia's tail method), the wedge test for the
// others, and a fresh draw when the wedge rejects.
func zigSlow(p *rand.PCG, j int32, i uint64) float64 {
	for {
		x := float64(j) * zig.wn[i]
		if i == 0 {
			for {
				x = -math.Log(zigUniform(p)) / zigR
				y := -math.Log(zigUniform(p))
				if y+y >= x*x {
					break
				}
			}
			if j > 0 {
				return zigR + x
			}
			return -zigR - x
		}
		if zig.fn[i]+zigUniform(p)*(zig.fn[i-1]-zig.fn[i]) < math.Exp(-0.5*x*x) {
			return x
		}
		u := p.Uint64()
		j = int32(uint32(u))
		i = (u >> 32) & 127
		m := j >> 31
		if uint32((j^m)-m) < zig.kn[i] {
			return float64(j) * zig.wn[i]
		}
	}
}
