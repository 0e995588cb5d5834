package main

import (
	"os/exec"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
)

// The command is production code: it must not link package testing or the
// test helpers of package feedbacktest (its audit lives in feedback/audit).
func TestCommandLinksNoTestCode(t *testing.T) {
	if testing.Short() {
		t.Skip("runs go list")
	}
	out, err := exec.Command("go", "list", "-deps", ".").CombinedOutput()
	require.NoError(t, err, "%s", out)
	for _, dep := range strings.Fields(string(out)) {
		switch {
		case dep == "testing", strings.HasPrefix(dep, "testing/"), strings.HasSuffix(dep, "/feedbacktest"),
			strings.HasPrefix(dep, "github.com/stretchr/testify"):
			t.Errorf("the ejecta command links %s", dep)
		}
	}
}
