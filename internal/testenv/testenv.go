// Package testenv locates the external data Kinword's tests compare
// against: the public test collections beside the repository and Debian's
// Snowball reference vocabulary. A missing folder skips the test with a
// message, except in CI (CI=true), where .ci/run provides them and their
// absence is a failure. Only tests import it; it must not import bleve,
// gin or database drivers.
package testenv

import (
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

// repoRoot is the repository root, found from this file's location.
func repoRoot() string {
	_, file, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(file), "..", "..")
}

// require returns dir if it exists, else skips (or fails in CI) naming the
// setting that points elsewhere.
func require(t testing.TB, dir, what, hint string) string {
	t.Helper()
	if _, err := os.Stat(dir); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s missing at %s in CI (%s): %v", what, dir, hint, err)
		}
		t.Skipf("%s not found at %s (%s): %v", what, dir, hint, err)
	}
	return dir
}

// Collections is the folder of the public test collections:
// $KINWORD_COLLECTIONS, else ../shared/collections beside the repository.
func Collections(t testing.TB) string {
	t.Helper()
	dir := os.Getenv("KINWORD_COLLECTIONS")
	if dir == "" {
		dir = filepath.Join(repoRoot(), "..", "shared", "collections")
	}
	return require(t, dir, "test collections", "set KINWORD_COLLECTIONS")
}

// Snowball is the folder of the Snowball English reference vocabulary:
// $KINWORD_SNOWBALL_DATA, else Debian snowball-data's location.
func Snowball(t testing.TB) string {
	t.Helper()
	dir := os.Getenv("KINWORD_SNOWBALL_DATA")
	if dir == "" {
		dir = "/usr/share/snowball/data/english"
	}
	return require(t, dir, "Snowball reference vocabulary", "apt-get install snowball-data, or set KINWORD_SNOWBALL_DATA")
}
