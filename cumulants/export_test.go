package cumulants

// SkipUnreadCov lets the external tests compute every covariance.
var SkipUnreadCov = &skipUnreadCov
