package report

import (
	"runtime/debug"
	"testing"
)

// TestVersionOf: the version string follows the build information as
// runtime/debug documents its keys (vcs.revision, vcs.modified; "(devel)"
// for a build of the main module from its work tree).
func TestVersionOf(t *testing.T) {
	rev := "0123456789abcdef0123456789abcdef01234567"
	for _, tc := range []struct {
		name string
		bi   debug.BuildInfo
		want string
	}{
		{"test binary", debug.BuildInfo{}, "devel"},
		{"work tree", debug.BuildInfo{Main: debug.Module{Version: "(devel)"}, Settings: []debug.BuildSetting{{Key: "vcs.revision", Value: rev}, {Key: "vcs.modified", Value: "false"}}}, "devel (0123456789ab)"},
		{"changed work tree", debug.BuildInfo{Main: debug.Module{Version: "(devel)"}, Settings: []debug.BuildSetting{{Key: "vcs.revision", Value: rev}, {Key: "vcs.modified", Value: "true"}}}, "devel (0123456789ab+modified)"},
		{"release", debug.BuildInfo{Main: debug.Module{Version: "v1.2.0"}}, "v1.2.0"},
		{"pseudo-version holds the revision", debug.BuildInfo{Main: debug.Module{Version: "v0.0.0-20261202053400-0123456789ab"}, Settings: []debug.BuildSetting{{Key: "vcs.revision", Value: rev}}}, "v0.0.0-20261202053400-0123456789ab"},
	} {
		if got := versionOf(&tc.bi); got != tc.want {
			t.Errorf("%s: %q, want %q", tc.name, got, tc.want)
		}
	}
}
