package cumulants

// SkipUnreadCov lets the external tests compute every covariance.
var SkipUnreadCov = &skipUnreadCov

// UnrolledOrder2 lets the external tests use the general χ² loop.
var UnrolledOrder2 = &unrolledOrder2
