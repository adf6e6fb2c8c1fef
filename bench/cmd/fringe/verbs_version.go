package main

import (
	"context"
	"fmt"
	"io"
	"runtime"
	"runtime/debug"
	"strings"

	"fringe/bench/runner"
)

// runVersion is `fringe version` (also `fringe -version`).
func runVersion(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) > 0 {
		return usagef("version takes no arguments, got %q", pos[0])
	}
	return writeVersion(stdout)
}

func writeVersion(w io.Writer) error {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		bi = nil
	}
	_, err := io.WriteString(w, versionText(bi, runtime.Version(), runtime.GOOS+"/"+runtime.GOARCH))
	return err
}

// versionText is what `fringe version` prints, four lines in a fixed
// order:
//
//	fringe 0.1.0-dev
//	module: fringe (devel)
//	commit: 5a3453c0... 2026-01-02T03:04:05Z (modified: uncommitted changes)
//	go: go1.26.8 linux/amd64
//
// The module line is the main module's path and version as the build
// recorded them (debug.ReadBuildInfo; "(devel)" for a build from a
// checkout); the commit line is the version-control stamp that go build
// and go install add (vcs.revision, vcs.time, vcs.modified), or says that
// the build carries none (go run, go test, -buildvcs=false, or a build
// outside a repository). bi nil means no build information.
func versionText(bi *debug.BuildInfo, goVersion, platform string) string {
	var b strings.Builder
	fmt.Fprintf(&b, "fringe %s\n", runner.Version)
	module, commit := "unknown (no build information)", "unknown (no build information)"
	if bi != nil {
		if bi.GoVersion != "" {
			goVersion = bi.GoVersion
		}
		module = strings.TrimSpace(bi.Main.Path + " " + bi.Main.Version)
		if module == "" {
			module = "unknown (the build recorded no main module)"
		}
		var rev, when, modified string
		for _, s := range bi.Settings {
			switch s.Key {
			case "vcs.revision":
				rev = s.Value
			case "vcs.time":
				when = s.Value
			case "vcs.modified":
				modified = s.Value
			}
		}
		switch {
		case rev == "":
			commit = "unknown (built without version-control information: go run, go test, -buildvcs=false or outside a repository)"
		default:
			commit = rev
			if when != "" {
				commit += " " + when
			}
			if modified == "true" {
				commit += " (modified: uncommitted changes)"
			}
		}
	}
	fmt.Fprintf(&b, "module: %s\n", module)
	fmt.Fprintf(&b, "commit: %s\n", commit)
	fmt.Fprintf(&b, "go: %s %s\n", goVersion, platform)
	return b.String()
}
