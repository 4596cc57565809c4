package stats

import (
	"math"
	"slices"
)

// Median returns the median of v: the middle value of the sorted values,
// or the mean of the two middle values when len(v) is even (the common
// definition, e.g. Python's statistics.median). v is not modified. It
// panics when v is empty.
//
// gonum's stat.Quantile(0.5, …) is not the same: its Empirical kind returns
// the lower of the two middle values, and its LinInterp kind interpolates
// the empirical distribution function, which for an odd count gives the
// mean of the middle value and the one below it.
func Median(v []float64) float64 {
	c := sortedCopy(v)
	n := len(c)
	if n%2 == 1 {
		return c[n/2]
	}
	return (c[n/2-1] + c[n/2]) / 2
}

// MedianHigh returns the upper of the two middle values when len(v) is
// even and the median when it is odd (Python's statistics.median_high): a
// typical value that is always one of the data, e.g. a reference to scale
// by. v is not modified. It panics when v is empty. gonum's Empirical
// quantile returns the lower middle value instead.
func MedianHigh(v []float64) float64 {
	c := sortedCopy(v)
	return c[len(c)/2]
}

func sortedCopy(v []float64) []float64 {
	if len(v) == 0 {
		panic("stats: median of no values")
	}
	c := slices.Clone(v)
	slices.Sort(c)
	return c
}

// MeanSD returns the mean of v and its sample standard deviation (n − 1 in
// the denominator); the SD of a single value is 0. The mean of no values is
// NaN.
//
// gonum's stat.MeanStdDev gives the same values to within rounding, but not
// bit for bit: its mean sums with several accumulators (floats.Sum), its
// variance adds the compensation term of the corrected two-pass algorithm
// (Chan, Golub and LeVeque, "Algorithms for computing the sample variance:
// analysis and recommendations", Am. Stat. 37, 242, 1983), and it returns
// NaN for the SD of a single value. Here both are plain sums in input order.
func MeanSD(v []float64) (mean, sd float64) {
	for _, x := range v {
		mean += x
	}
	mean /= float64(len(v))
	if len(v) < 2 {
		return mean, 0
	}
	for _, x := range v {
		sd += (x - mean) * (x - mean)
	}
	return mean, math.Sqrt(sd / float64(len(v)-1))
}

// CountDistinct returns how many distinct values v holds when values that
// are close are taken as one. Sorted, a value counts when it exceeds the
// one before it by more than atol + rtol·|value|, the closeness test of
// NumPy's isclose (absolute and relative tolerance). With both tolerances 0
// it counts exactly distinct values; NaN values are not expected. v is not
// modified. gonum has no such count.
func CountDistinct(v []float64, atol, rtol float64) int {
	if len(v) == 0 {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	k := 1
	for i := 1; i < len(s); i++ {
		if s[i]-s[i-1] > atol+rtol*math.Abs(s[i]) {
			k++
		}
	}
	return k
}

// IsFinite reports whether x is neither NaN nor infinite. Neither the
// standard library nor gonum has it for a single value.
func IsFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
