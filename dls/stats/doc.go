// Package stats holds the few descriptive statistics that several packages
// of dlsbatch need, written once: medians, the mean with the sample
// standard deviation, a count of distinct values and a finiteness test.
//
// gonum's stat and floats packages are used wherever they compute the same
// thing bit for bit. Where they do not, the doc comment of the function here
// says why: the outputs of dlsbatch are compared byte for byte between
// versions, so a statistic may not change even in its last bit.
//
// cumulants and contin import no package of this module (they are
// numerical libraries usable on data from anywhere) and keep private copies
// of what they need.
package stats
