package rrkm

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// powerSum evaluates S_p(x) = Σ_j c_j·(x − jδ)^p over the j with jδ < x, the
// convolution of a fine-grain comb with a power-law kernel (a classical rotor's
// sum of states, its integral, or a fractional integral of it). Far from x the
// comb is grouped in blocks whose moments about the block centre give the
// binomial series
//
//	(y − d)^p = y^p Σ_k C(p,k)·(−d/y)^k,   |d/y| ≤ 1/(2m+1),
//
// truncated after order moments−1; the m nearest blocks are summed exactly.
// The relative truncation error is about |C(p,K)|·(2m+1)^(−K) with K = 9,
// zero for whole p < K. m is nearBlocks (3) unless that bound exceeds
// maxSeriesError, which happens only for exponents above about 8; then more
// blocks are summed exactly. Every term is positive, so the bound holds for
// the whole sum. The cost per point is O(len(c)/block + block·m) instead of
// O(len(c)).
//
// at uses a hierarchy of blocks instead (see levels): near x blocks of
// baseBlock bins, doubling in size with the distance from x, so that every
// block keeps the same separation ratio as above while a point costs
// O(nearBlocks·log N) series and O(nearBlocks·baseBlock) exact terms.
type powerSum struct {
	c     []float64
	delta float64
	block int                // fine bins a block (atHalfNodes)
	mom   [][moments]float64 // mom[b][k] = Σ_{j in block b} c_j·(jδ − centre_b)^k
	// levels[l][b] are the moments of block b of baseBlock<<l bins about
	// its centre, for every whole block of that size.
	levels [][][moments]float64
}

const (
	// baseBlock is the size in fine bins of the smallest blocks of the
	// hierarchy at uses.
	baseBlock  = 16
	nearBlocks = 3
	moments    = 9
	// maxSeriesError bounds the relative truncation error of the block
	// series. With nearBlocks = 3 the bound |C(p,9)|·7^(−9) is at most
	// 3.4e-10 for 0 < p ≤ 7.5 (2.7e-10 at p = ½ and 7.5), so rotors and the
	// usual inverse-Laplace exponents keep three near blocks; p = 8.5 takes
	// four, p = 20.5 twenty.
	maxSeriesError = 1e-9
)

// newPowerSum groups the comb in blocks of about sqrt(N·moments/nearBlocks)
// bins (a power of two), which balances the far and near costs of at.
func newPowerSum(c []float64, delta float64) *powerSum {
	block := 64
	for block < 1024 && block*block < len(c)*moments/nearBlocks {
		block *= 2
	}
	ps := &powerSum{c: c, delta: delta, block: block, levels: blockLevels(c, delta)}
	// atHalfNodes' blocks are one level of the hierarchy (none if the comb
	// is shorter than a block).
	for k, size := 0, baseBlock; k < len(ps.levels); k, size = k+1, 2*size {
		if size == block {
			ps.mom = ps.levels[k]
		}
	}
	return ps
}

// blockMoments returns, for every whole block of size bins of the comb,
// its moments Σ c_j·(jδ − centre)^k about the block's centre, k <
// moments.
func blockMoments(c []float64, delta float64, size int) [][moments]float64 {
	mom := make([][moments]float64, len(c)/size)
	for b := range mom {
		centre := float64(b*size) + float64(size-1)/2
		for j := b * size; j < (b+1)*size; j++ {
			d := (float64(j) - centre) * delta
			w := c[j]
			for k := range moments {
				mom[b][k] += w
				w *= d
			}
		}
	}
	return mom
}

// blockLevels returns the moments of the comb's blocks of baseBlock,
// 2·baseBlock, 4·baseBlock … bins, each level's moments made from the level
// below by moving the two halves' moments to the parent's centre:
//
//	Σ c·(d + s)^k = Σ_i C(k,i)·s^(k−i)·M_i,   s = child centre − parent centre.
func blockLevels(c []float64, delta float64) [][][moments]float64 {
	var binom [moments][moments]float64
	for k := range moments {
		binom[k][0] = 1
		for i := 1; i <= k; i++ {
			binom[k][i] = binom[k-1][i-1]
			if i < k {
				binom[k][i] += binom[k-1][i]
			}
		}
	}
	var levels [][][moments]float64
	n := len(c) / baseBlock
	if n == 0 {
		return nil
	}
	levels = append(levels, blockMoments(c, delta, baseBlock))
	for size := 2 * baseBlock; len(c)/size > 0; size *= 2 {
		below := levels[len(levels)-1]
		up := make([][moments]float64, len(c)/size)
		half := float64(size/2) * delta / 2 // |child centre − parent centre|
		for b := range up {
			for side, s := range [2]float64{-half, half} {
				m := &below[2*b+side]
				var sp [moments]float64 // s^0 … s^(moments−1)
				sp[0] = 1
				for k := 1; k < moments; k++ {
					sp[k] = sp[k-1] * s
				}
				for k := range moments {
					t := 0.0
					for i := 0; i <= k; i++ {
						t += binom[k][i] * sp[k-i] * m[i]
					}
					up[b][k] += t
				}
			}
		}
		levels = append(levels, up)
	}
	return levels
}

// at returns S_p(x) for x > 0 and any exponent p > 0. Multiples of ½ (rotor
// dimensions are whole numbers) use repeated multiplication and one square
// root; other exponents (fractional integrals, see Counter.fracSum) use
// math.Pow.
func (ps *powerSum) at(x, p float64) float64 {
	if !(p > 0) || math.IsInf(p, 0) {
		panic("rrkm: powerSum exponent must be positive and finite")
	}
	twoP := 0 // 0: not a multiple of ½, use math.Pow
	if h := 2 * p; h == math.Trunc(h) && h < 1<<20 {
		twoP = int(h)
	}
	// Binomial coefficients C(p,k)·(−1)^k.
	var coef [moments + 1]float64
	coef[0] = 1
	for k := 1; k <= moments; k++ {
		coef[k] = -coef[k-1] * (p - float64(k-1)) / float64(k)
	}
	near := nearBlocks
	for math.Abs(coef[moments])*math.Pow(float64(2*near+1), -moments) > maxSeriesError {
		near++
	}
	last := int(math.Ceil(x/ps.delta)) - 1 // highest j with jδ < x
	if last >= len(ps.c) {
		last = len(ps.c) - 1
	}
	pow := func(y float64) float64 {
		if twoP > 0 {
			return powHalf(y, twoP)
		}
		return math.Pow(y, p)
	}
	// From the top down: a bin at a time until a whole block ending at hi
	// is far enough from x for its series, then the largest such block.
	// A block of B bins qualifies when its centre is at least
	// (near + ½)·B bins below x, so |d/y| ≤ 1/(2·near + 1) as above; the
	// condition only gets harder for larger blocks, so the sizes grow with
	// the distance and the block count stays about near per level.
	sum := 0.0
	hi := last + 1 // bins [0, hi) are still to add
	reach := float64(near) + 0.5
	for hi > 0 {
		level, size := -1, baseBlock
		for l := range ps.levels {
			if hi%size != 0 || x-(float64(hi)-float64(size+1)/2)*ps.delta < reach*float64(size)*ps.delta {
				break
			}
			level = l
			size *= 2
		}
		if level < 0 {
			hi--
			if w := ps.c[hi]; w != 0 {
				if y := x - float64(hi)*ps.delta; y > 0 {
					sum += w * pow(y)
				}
			}
			continue
		}
		size = baseBlock << level
		b := hi/size - 1
		y := x - (float64(b*size)+float64(size-1)/2)*ps.delta
		inv, r, t := 1/y, 1.0, 0.0
		m := &ps.levels[level][b]
		for k := range moments {
			t += coef[k] * m[k] * r
			r *= inv
		}
		sum += pow(y) * t
		hi -= size
	}
	return sum
}

// powHalf returns y^(twoP/2) for y > 0 with multiplications and at most one
// square root, several times faster than math.Pow.
func powHalf(y float64, twoP int) float64 {
	r := 1.0
	for range twoP / 2 {
		r *= y
	}
	if twoP%2 == 1 {
		r *= math.Sqrt(y)
	}
	return r
}

// atHalfNodes returns S_p((j+½)δ) for j = 0 … jmax, the values that at
// returns one by one, with the powers of the near part taken from a table of
// ((k+½)δ)^p instead of a square root per state: the fine-grain sums of
// states that the tunnelling convolution needs.
func (ps *powerSum) atHalfNodes(jmax int, p float64) []float64 {
	block := ps.block
	twoP := int(2 * p)
	if float64(twoP) != 2*p || twoP <= 0 {
		panic("rrkm: powerSum exponent must be a positive multiple of 1/2")
	}
	var coef [moments]float64
	coef[0] = 1
	for k := 1; k < moments; k++ {
		coef[k] = -coef[k-1] * (p - float64(k-1)) / float64(k)
	}
	// rev[i] = ((nt−1−i+½)δ)^p, so that the near part for point jp is a dot
	// product running forwards through both the comb and rev.
	nt := (nearBlocks + 1) * block
	rev := make([]float64, nt)
	for k := range nt {
		rev[nt-1-k] = powHalf((float64(k)+0.5)*ps.delta, twoP)
	}
	out := make([]float64, jmax+1)
	for jp := range out {
		x := (float64(jp) + 0.5) * ps.delta
		last := min(jp, len(ps.c)-1)
		farBlocks := min(max(last/block-nearBlocks, 0), len(ps.mom))
		sum := 0.0
		for b := range farBlocks {
			y, t := ps.series(x, b, coef[:])
			sum += powHalf(y, twoP) * t
		}
		lo := farBlocks * block
		// Beyond the last whole block the near part can outgrow the table.
		for ; jp-lo >= nt; lo++ {
			sum += ps.c[lo] * powHalf(x-float64(lo)*ps.delta, twoP)
		}
		if lo <= last {
			sum += floats.Dot(ps.c[lo:last+1], rev[nt-1-jp+lo:nt-jp+last])
		}
		out[jp] = sum
	}
	return out
}

// series returns the distance y from block b's centre to x and the block's
// binomial series Σ_k coef[k]·M_k·y^(−k), so the block contributes y^p·series.
func (ps *powerSum) series(x float64, b int, coef []float64) (y, t float64) {
	y = x - (float64(b*ps.block)+float64(ps.block-1)/2)*ps.delta
	inv, r := 1/y, 1.0
	m := &ps.mom[b]
	for k := range moments {
		t += coef[k] * m[k] * r
		r *= inv
	}
	return y, t
}
