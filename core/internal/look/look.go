// Package look is the one switch of the "look" tests, which write plots,
// charts and simulated photos for people to look at: SAGITTA_LOOK=dir
// turns them all on, each package writing into its own folder of dir
// (dir/plot, dir/chart, ...). Without it they are skipped. Only tests
// import this package.
package look

import (
	"os"
	"path/filepath"
	"testing"
)

// Env is the environment variable that names the folder.
const Env = "SAGITTA_LOOK"

// Dir returns the folder sub of $SAGITTA_LOOK, created, and true; "" and
// false when SAGITTA_LOOK is not set.
func Dir(t testing.TB, sub string) (string, bool) {
	t.Helper()
	root := os.Getenv(Env)
	if root == "" {
		return "", false
	}
	dir := filepath.Join(root, sub)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	return dir, true
}

// Need is Dir for a test that only writes for looking at: it skips the
// test when SAGITTA_LOOK is not set.
func Need(t testing.TB, sub string) string {
	t.Helper()
	dir, ok := Dir(t, sub)
	if !ok {
		t.Skipf("set %s=dir to write into dir/%s for looking at", Env, sub)
	}
	return dir
}
