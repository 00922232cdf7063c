package main

import (
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate/fecheck"
)

// feRows returns the table rows of plica verify's output in the fe area.
func feRows(out string) []string {
	var rows []string
	for _, l := range strings.Split(out, "\n") {
		if strings.HasPrefix(l, "fe ") {
			rows = append(rows, l)
		}
	}
	return rows
}

// TestVerifyWithoutCCX: without ccx on PATH (PATH emptied), plica verify
// -fe lists every FE case as SKIP with the reason, counts them neither as
// passed nor as failed, says how many were skipped and exits 0; without
// -fe there are no FE rows and a line points at -fe.
func TestVerifyWithoutCCX(t *testing.T) {
	t.Setenv("PATH", "")
	code, out, errOut := runCLI(t, "verify", "-quick", "-fe")
	require.Equal(t, 0, code, "stderr %q", errOut)
	rows := feRows(out)
	require.NotEmpty(t, rows)
	for _, r := range rows {
		assert.Contains(t, r, "skipped: ccx not found (Debian package calculix-ccx)")
		assert.Contains(t, r, "SKIP")
		assert.NotContains(t, r, "PASS")
		assert.NotContains(t, r, "FAIL")
	}
	m := regexp.MustCompile(`\n(\d+) of (\d+) cases pass; (\d+) skipped: ccx not found \(Debian package calculix-ccx\)\n`).FindStringSubmatch(out)
	require.NotNil(t, m, "summary line in %q", out)
	assert.Equal(t, m[1], m[2], "every case that ran passes")
	assert.Equal(t, strconv.Itoa(len(rows)), m[3], "skipped count = FE rows")
	assert.Len(t, rows, len(fecheck.VerificationCases()))
	assert.NotContains(t, out, "run with -fe")

	code, plain, _ := runCLI(t, "verify", "-quick")
	require.Equal(t, 0, code)
	assert.Empty(t, feRows(plain), "no FE cases without -fe")
	assert.NotContains(t, plain, "skipped")
	assert.Contains(t, plain, "(the finite-element comparisons with CalculiX run with -fe)")
	assert.Contains(t, plain, "\n"+m[2]+" of "+m[2]+" cases pass\n", "the same cases ran, less the FE ones")
}

// TestFEVerify runs plica verify -quick -fe with CalculiX (about 25 s
// on one core): every FE case runs and passes, none is skipped.
func TestFEVerify(t *testing.T) {
	needCCX(t)
	code, out, errOut := runCLI(t, "verify", "-quick", "-fe")
	require.Equal(t, 0, code, "stderr %q\n%s", errOut, out)
	rows := feRows(out)
	assert.Len(t, rows, len(fecheck.VerificationCases()))
	for _, r := range rows {
		assert.Contains(t, r, "PASS", r)
	}
	t.Logf("\n%s", strings.Join(rows, "\n"))
	assert.NotContains(t, out, "skipped")
	m := regexp.MustCompile(`\n(\d+) of (\d+) cases pass\n`).FindStringSubmatch(out)
	require.NotNil(t, m)
	assert.Equal(t, m[1], m[2])
}
