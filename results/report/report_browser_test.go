package report

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// findChromium returns the path of a Chromium binary, or "".
func findChromium() string {
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// TestReportInBrowser opens a report in headless Chromium and reads back
// the page's own self-check: every <svg> laid out with a non-zero size and
// no script error. Chromium also logs every console message to stderr,
// which must stay free of them. Without Chromium the test is skipped,
// unless PLICA_REQUIRE_BROWSER is set (as CI does).
func TestReportInBrowser(t *testing.T) {
	bin := findChromium()
	if bin == "" {
		if os.Getenv("PLICA_REQUIRE_BROWSER") != "" {
			t.Fatal("PLICA_REQUIRE_BROWSER is set but no chromium binary is on PATH (install the Debian package chromium)")
		}
		t.Skip("no chromium binary on PATH (install the Debian package chromium, or set PLICA_REQUIRE_BROWSER=1 to make this a failure)")
	}
	f := fixtureRun(t, 72)
	rep, err := Write(context.Background(), f, "", Options{})
	require.NoError(t, err)
	path, err := filepath.Abs(f.Path(File))
	require.NoError(t, err)

	ctx, cancel := context.WithTimeout(context.Background(), 120*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+t.TempDir(), "--enable-logging=stderr", "--v=0", "--dump-dom", "file://"+path)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	require.NoError(t, cmd.Run(), "chromium: %s", stderr.String())

	m := regexp.MustCompile(`<pre id="plica-selfcheck"[^>]*>figures=(\d+) zero=(\d+) errors=(\d+)</pre>`).FindStringSubmatch(stdout.String())
	require.NotNil(t, m, "the page ran its self-check (dumped DOM has no result)")
	figures, _ := strconv.Atoi(m[1])
	assert.Equal(t, len(rep.Figures), figures, "figures laid out")
	assert.Greater(t, figures, 0, "the report has figures")
	assert.Equal(t, "0", m[2], "figures with zero width or height")
	assert.Equal(t, "0", m[3], "script errors")
	sizes := regexp.MustCompile(`data-size="(\d+)x(\d+)"`).FindAllStringSubmatch(stdout.String(), -1)
	assert.Len(t, sizes, figures, "every figure measured")
	for _, s := range sizes {
		assert.NotEqual(t, "0", s[1], "figure width")
		assert.NotEqual(t, "0", s[2], "figure height")
	}
	for _, line := range strings.Split(stderr.String(), "\n") {
		assert.NotContains(t, line, ":CONSOLE", "console message while loading the report")
	}
}
