package main

import (
	"context"
	"fmt"
	"runtime"
	"runtime/debug"
)

// version is set at release build time with -ldflags "-X main.version=...".
var version = "dev"

func init() {
	register(&command{name: "version", summary: "print the version of this binary", usage: "[--json]", run: runVersion})
}

func runVersion(ctx context.Context, e *env, args []string) error {
	fs, c := newFlags("version", e.stderr)
	if _, err := e.parse(fs, c, args); err != nil {
		return err
	}
	info := map[string]string{"version": version, "go": runtime.Version()}
	if bi, ok := debug.ReadBuildInfo(); ok {
		for _, s := range bi.Settings {
			if s.Key == "vcs.revision" {
				info["revision"] = s.Value
			}
		}
	}
	if e.json {
		return e.printJSON(info)
	}
	fmt.Fprintf(e.stdout, "kinword %s (%s", info["version"], info["go"])
	if r := info["revision"]; r != "" {
		fmt.Fprintf(e.stdout, ", %s", r)
	}
	fmt.Fprintln(e.stdout, ")")
	return nil
}
