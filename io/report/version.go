package report

import (
	"runtime/debug"
	"strings"
)

// Version is the tool version written into every output: the module
// version of the build when it has one (a tagged release installed with
// go install), else "devel"; followed by the VCS revision it was built
// from (12 hex digits) and "+modified" for a build from a changed work
// tree, when the build recorded them. Tests and `go run` builds record no
// revision and give plain "devel".
func Version() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "devel"
	}
	return versionOf(bi)
}

func versionOf(bi *debug.BuildInfo) string {
	v := bi.Main.Version
	if v == "" || v == "(devel)" {
		v = "devel"
	}
	var rev, modified string
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			modified = s.Value
		}
	}
	if rev == "" || strings.Contains(v, rev[:min(12, len(rev))]) {
		return v
	}
	v += " (" + rev[:min(12, len(rev))]
	if modified == "true" {
		v += "+modified"
	}
	return v + ")"
}
