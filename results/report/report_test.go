package report

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"os"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"

	"plica/results"
)

// htmlElement is one element of the report.
type htmlElement struct {
	Name  string
	Attr  map[string]string
	Depth int
}

// parseReport checks that the report is well-formed (it is written as
// XHTML-compatible HTML, so a strict XML parser reads it) and lists its
// elements.
func parseReport(t *testing.T, b []byte) []htmlElement {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	dec.Strict = true
	var out []htmlElement
	depth := 0
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		require.NoError(t, err, "report parses")
		switch e := tok.(type) {
		case xml.StartElement:
			el := htmlElement{Name: e.Name.Local, Attr: map[string]string{}, Depth: depth}
			for _, a := range e.Attr {
				el.Attr[a.Name.Local] = a.Value
			}
			out = append(out, el)
			depth++
		case xml.EndElement:
			depth--
		}
	}
	require.Zero(t, depth, "every element is closed")
	require.Equal(t, "html", out[0].Name, "root element")
	return out
}

func countElements(els []htmlElement, name string) int {
	n := 0
	for _, e := range els {
		if e.Name == name {
			n++
		}
	}
	return n
}

func findID(els []htmlElement, id string) bool {
	for _, e := range els {
		if e.Attr["id"] == id {
			return true
		}
	}
	return false
}

// assertSelfContained checks that the page names no URL and loads no file.
func assertSelfContained(t *testing.T, page string, els []htmlElement) {
	t.Helper()
	for _, s := range []string{"http:", "https:", "ftp:", "file:", "//", "url(", "@import", "@font-face"} {
		assert.NotContains(t, page, s, "the report references nothing outside itself")
	}
	for _, e := range els {
		assert.NotContains(t, e.Attr, "src", "<%s src>", e.Name)
		assert.NotEqual(t, "link", e.Name, "no <link> element")
		if h, ok := e.Attr["href"]; ok {
			assert.True(t, strings.HasPrefix(h, "#"), "href %q points inside the page", h)
		}
	}
}

func TestReport(t *testing.T) {
	f := fixtureRun(t, 120)
	r, err := Load(f)
	require.NoError(t, err)
	checkText := func(name string, res *objective.Result) string {
		return "CHECK OUTPUT FOR " + name
	}
	rep, err := Write(context.Background(), f, "", Options{CheckText: checkText})
	require.NoError(t, err)
	assert.Empty(t, rep.Problems, "every part of the report is built")
	page := readFile(t, f.Path(File))
	assert.Equal(t, string(rep.HTML), page, "written report")
	els := parseReport(t, []byte(page))
	assertSelfContained(t, page, els)

	// default designs: the best of each objective and the knee
	fr := make([][]float64, len(r.Front))
	for i, row := range r.Front {
		fr[i] = r.Minimised(row)
	}
	var want []int
	for _, i := range Representative(fr) {
		want = append(want, r.Front[i].ID)
	}
	assert.Equal(t, want, rep.Designs, "designs shown by default")

	// cautions
	assert.Contains(t, page, results.Caution, "caution")
	for _, c := range Cautions {
		assert.Contains(t, page, c, "report caution")
	}

	// summary: variables with ranges and units, objectives, requirements, settings, hypervolume reference
	for _, v := range r.Spec.Variables {
		assert.Contains(t, page, v.Path(), "variable")
		assert.Contains(t, page, fmt.Sprintf("%.6g to %.6g", v.Lower, v.Upper), "range of %s", v.Path())
	}
	for _, s := range []string{"reach_mm", "tip_sag_mm", "maximize", "max_tip_sag_mm", "min_clearance_mm",
		"EvaluationLimit", "nsga2", "hypervolume (mm·mm)", "reference", "desk boom search"} {
		assert.Contains(t, page, s, "summary")
	}

	// front table: a header and one row per front design
	require.True(t, findID(els, "front-table"), "front table")
	m := regexp.MustCompile(`(?s)<table id="front-table">(.*?)</table>`).FindStringSubmatch(page)
	require.NotNil(t, m)
	assert.Equal(t, len(r.Front)+1, strings.Count(m[1], "<tr"), "front table rows")
	assert.Equal(t, len(rep.Designs), strings.Count(m[1], `class="chosen"`), "highlighted rows")

	// figures: front, variables, hypervolume, and backbone, loaded backbone, workspace and sag map per design
	assert.Len(t, rep.Figures, 3+4*len(rep.Designs), "figures")
	assert.Equal(t, len(rep.Figures), countElements(els, "svg"), "every figure is inlined")
	assert.Equal(t, len(rep.Figures), countElements(els, "figcaption"), "every figure has a caption")
	for _, fig := range rep.Figures {
		assert.Contains(t, page, "plots/"+fig.Name, "figure %s is named", fig.Name)
		assert.FileExists(t, f.Path(PlotsDir+"/"+fig.Name), "figure %s is written", fig.Name)
		parseSVG(t, []byte(readFile(t, f.Path(PlotsDir+"/"+fig.Name))))
	}

	// chosen designs: a check table with every check, and the full check output
	for _, id := range rep.Designs {
		assert.True(t, findID(els, fmt.Sprintf("design-%d", id)), "section of design %d", id)
		assert.Contains(t, page, "CHECK OUTPUT FOR "+results.DesignFileName(id), "check output of design %d", id)
	}
	tables := regexp.MustCompile(`(?s)<table class="checks">(.*?)</table>`).FindAllStringSubmatch(page, -1)
	require.Len(t, tables, len(rep.Designs), "one check table per design")
	for _, tb := range tables {
		assert.Equal(t, len(r.Spec.Checks)+1, strings.Count(tb[1], "<tr>"), "check table: a header and every check")
	}
	assert.Contains(t, page, `id="plica-selfcheck"`, "self-check element")

	// order: what a designer looks at first leads (the front figure, the
	// chosen designs), the design sections follow, and the full front table
	// comes near the end, folded
	at := func(s string) int {
		i := strings.Index(page, s)
		require.GreaterOrEqual(t, i, 0, "page holds %s", s)
		return i
	}
	assert.Less(t, at(`id="fig-front"`), at(`id="chosen-table"`), "the front figure leads")
	assert.Less(t, at(`id="chosen-table"`), at(`<section id="design-`), "the chosen designs come before their sections")
	assert.Less(t, at(`<section id="design-`), at(`id="summary"`), "designs before the problem summary")
	assert.Less(t, at(`id="summary"`), at(`id="front-table"`), "the full front table near the end")
	assert.Less(t, at(`<details id="front-details">`), at(`id="front-table"`), "the full front table is folded")
	assert.Less(t, at(`id="front-table"`), at(`id="cautions"`), "the front table before the cautions")
	for _, id := range rep.Designs {
		assert.Contains(t, page, fmt.Sprintf(`<a href="#design-%d">%d</a>`, id, id), "the chosen-designs table links design %d", id)
	}
	assert.Less(t, at(`id="fig-front"`), at(`<table class="checks">`), "no table of numbers before the front figure")
}

func TestReportRequestedDesigns(t *testing.T) {
	f := fixtureRun(t, 72)
	r, err := Load(f)
	require.NoError(t, err)
	last := r.Front[len(r.Front)-1].ID
	out := f.Path("elsewhere.html")
	rep, err := Write(context.Background(), f, out, Options{Designs: []int{last}})
	require.NoError(t, err)
	assert.Equal(t, []int{last}, rep.Designs)
	page := readFile(t, out)
	els := parseReport(t, []byte(page))
	assert.True(t, findID(els, fmt.Sprintf("design-%d", last)), "requested design")
	assert.Equal(t, 1, strings.Count(page, `<section id="design-`), "only the requested design")
	assert.Contains(t, page, "requested")
	assert.FileExists(t, f.Path(fmt.Sprintf("%s/backbone-%03d.svg", PlotsDir, last)))
	assert.NoFileExists(t, f.Path(File), "-o writes elsewhere")

	_, err = Build(context.Background(), f, Options{Designs: []int{len(r.Front) + 1}})
	var unknown *UnknownDesignError
	require.True(t, errors.As(err, &unknown), "unknown id gives UnknownDesignError, got %v", err)
	assert.ErrorContains(t, err, fmt.Sprintf("expected an id from 1 to %d", len(r.Front)))
}

func TestReportEmptyFront(t *testing.T) {
	f := fixtureRun(t, 36, impossibleSag)
	rep, err := Build(context.Background(), f, Options{})
	require.NoError(t, err)
	assert.Empty(t, rep.Designs, "nothing to show")
	page := string(rep.HTML)
	els := parseReport(t, rep.HTML)
	assertSelfContained(t, page, els)
	assert.Contains(t, page, "The front is empty")
	assert.Contains(t, page, "No feasible design was found")
	// the diagnosis leads the page, before the problem summary
	require.True(t, findID(els, "diagnosis"), "an empty front carries its diagnosis")
	assert.Less(t, strings.Index(page, `id="diagnosis"`), strings.Index(page, `id="summary"`), "the diagnosis comes first")
	assert.Contains(t, page, "Why the search found no feasible designs")
	assert.Contains(t, page, "max_tip_sag", "the diagnosis names the blocking constraint")
	assert.Contains(t, page, results.Caution)
	assert.Equal(t, len(rep.Figures), countElements(els, "svg"), "figures")
}

func TestReportMissingDesignFile(t *testing.T) {
	f := fixtureRun(t, 36)
	require.NoError(t, os.Remove(f.Path(results.DesignFileName(1))))
	rep, err := Build(context.Background(), f, Options{Designs: []int{1}})
	require.NoError(t, err, "a missing design file does not stop the report")
	require.Len(t, rep.Problems, 1)
	assert.Contains(t, rep.Problems[0], "front-001.toml")
	assert.Contains(t, string(rep.HTML), "could not be checked", "the page says what is missing")
	parseReport(t, rep.HTML)
}

func TestReportBeforeFront(t *testing.T) {
	f := fixtureRun(t, 36)
	require.NoError(t, os.Remove(f.Path(results.FrontFile)))
	rep, err := Build(context.Background(), f, Options{})
	require.NoError(t, err, "a run without front.csv still has a report")
	page := string(rep.HTML)
	parseReport(t, rep.HTML)
	assert.Contains(t, page, "The run stopped before writing front.csv")
	assert.NotContains(t, page, "no feasible design was found", "a missing front is not an empty one")
}

func readFile(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return string(b)
}

// TestReportWarnCheck: a failed check with Warn set (validated_range)
// shows as WARN, not FAIL, and does not count as failed, as plica check
// prints it; a design that passes with a warning says so in its result
// line, and a real failure still shows FAIL.
func TestReportWarnCheck(t *testing.T) {
	checks := []objective.Check{
		{Name: "peak_strain", Value: 0.01, Limit: 0.02, Max: true, Pass: true},
		{Name: "validated_range[1]", Value: 0.3, Limit: 0, Max: true, Pass: false, Warn: true, Note: "t/w 0.65 > 0.5"},
		{Name: "validated_range[2]", Value: 0, Limit: 0, Max: true, Pass: true, Warn: true},
	}
	rows, failed, warned := checkRows(checks)
	require.Len(t, rows, 3)
	assert.Equal(t, 0, failed)
	assert.Equal(t, 1, warned)
	assert.True(t, rows[1].Warn)
	assert.False(t, rows[2].Warn, "a warn check that passes is PASS")

	render := func(pass bool, rows []checkRow, failed, warned int) string {
		page := &htmlPage{Title: "t", Designs: []designSection{{ID: 1, File: "designs/front-001.toml", HasResult: true, Pass: pass,
			Checks: rows, NumChecks: len(rows), FailedChecks: failed, WarnChecks: warned}}}
		var b bytes.Buffer
		require.NoError(t, reportTemplate.Execute(&b, page))
		parseReport(t, b.Bytes())
		out := b.String()
		i := strings.Index(out, `<section id="design-1">`)
		require.GreaterOrEqual(t, i, 0)
		out = out[i:]
		return out[:strings.Index(out, "</section>")] // the design's section
	}
	out := render(true, rows, failed, warned)
	assert.Contains(t, out, `<td><code>validated_range[1]</code></td><td class="num">0.3</td><td class="num">≤ 0</td><td></td><td><span class="warn">WARN</span></td>`)
	assert.NotContains(t, out, `class="fail"`)
	assert.Contains(t, out, `<span class="pass">PASS</span> (3 checks; 1 with a warning)`)

	checks[0].Pass = false
	rows, failed, warned = checkRows(checks)
	assert.Equal(t, 1, failed)
	out = render(false, rows, failed, warned)
	assert.Contains(t, out, `<td><code>peak_strain</code></td><td class="num">0.01</td><td class="num">≤ 0.02</td><td></td><td><span class="fail">FAIL</span></td>`)
	assert.Contains(t, out, `<span class="fail">FAIL</span> (1 of 3 checks failed; 1 with a warning)`)
	assert.Contains(t, out, `<span class="warn">WARN</span>`)
}
