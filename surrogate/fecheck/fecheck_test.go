package fecheck

import (
	"bytes"
	"context"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// needCCX skips a test when ccx is not on PATH, or fails it when
// PLICA_REQUIRE_CCX=1; -short skips it too (these tests run CalculiX).
func needCCX(t *testing.T) {
	t.Helper()
	if testing.Short() {
		t.Skip("runs CalculiX; skipped with -short")
	}
	if !HaveCCX("") {
		if os.Getenv("PLICA_REQUIRE_CCX") == "1" {
			t.Fatal("ccx is not on PATH and PLICA_REQUIRE_CCX=1: install the Debian package " + Package)
		}
		t.Skip("ccx is not on PATH (Debian package " + Package + "); set PLICA_REQUIRE_CCX=1 to make this a failure")
	}
}

func resin() surrogate.Material {
	m, ok := surrogate.LookupMaterial("resin")
	if !ok {
		panic("no resin")
	}
	return m
}

func TestMeridianGeometry(t *testing.T) {
	// U-profile with semicircular crowns (rm = q/4): developed length of
	// one pitch 2w + (2π − 4)·rm (elementary geometry: two flanks of
	// w − 2rm and four quarter arcs; common practice).
	g := surrogate.Geometry{OuterDiameter: 0.03, Depth: 0.004, Pitch: 0.005, Wall: 0.0004, Profile: surrogate.UShape}
	w := bellowsWall(g)
	var dev float64
	for i := range w.pieces {
		dev += w.pieces[i].length()
	}
	rm := g.Pitch / 4
	assert.InDelta(t, 2*g.Depth+(2*math.Pi-4)*rm, dev, 1e-12)
	for _, prof := range []surrogate.Profile{surrogate.Sinusoid, surrogate.UShape, surrogate.Trapezoid} {
		g.Profile, g.FlatFraction = prof, 0.4
		w := bellowsWall(g)
		p := w.points(24)
		rMin, rMax := math.Inf(1), math.Inf(-1)
		for i, q := range p {
			rMin, rMax = math.Min(rMin, q.r), math.Max(rMax, q.r)
			assert.InDelta(t, 1, math.Hypot(q.tr, q.tz), 1e-12, "%s: unit tangent", prof)
			if i > 0 {
				// consecutive mesh points are close (no jumps between pieces)
				d := math.Hypot(q.r-p[i-1].r, q.z-p[i-1].z)
				assert.Less(t, d, 0.25*g.Pitch, "%s: point %d", prof, i)
			}
		}
		// root and crown centrelines at Rm ∓ w/2 (surrogate.Geometry's
		// convention), periodic over the pitch
		assert.InDelta(t, g.MeanRadius()-g.Depth/2, rMin, 1e-12, "%s", prof)
		assert.InDelta(t, g.MeanRadius()+g.Depth/2, rMax, 1e-12, "%s", prof)
		assert.InDelta(t, p[0].r, p[len(p)-1].r, 1e-15)
		assert.InDelta(t, p[0].z+g.Pitch, p[len(p)-1].z, 1e-15)
	}
}

func TestShellMeshHelicalSeam(t *testing.T) {
	// A helical wall is one strip wound round: every element edge at the
	// seam is shared, so each node is used by 1…4 elements and the rings
	// hold one node per grid column.
	g := surrogate.Geometry{OuterDiameter: 0.03, Depth: 0.004, Pitch: 0.006, Wall: 0.0004, Profile: surrogate.Sinusoid, Helical: true}
	b := surrogate.Bellows{Geometry: g, Material: resin()}
	s := shellFor(&b, Coarse)
	m := s.build()
	uses := map[int]int{}
	for _, e := range m.elems {
		for _, n := range e[:4] {
			uses[n]++
		}
	}
	for n, k := range uses {
		assert.LessOrEqual(t, k, 4, "node %d", n)
	}
	assert.Len(t, m.ringA, 2*s.around)
	assert.Len(t, m.ringB, 2*s.around)
	// the helix rises one pitch per turn
	first, last := m.node(m.ringA[0]), m.node(m.ringA[len(m.ringA)-1])
	assert.InDelta(t, g.Pitch*float64(2*s.around-1)/float64(2*s.around), last.z-first.z, 1e-12)
}

// TestGradedEdges checks the circumferential grading of a spined wall:
// the edges close the circle, the spine edges and the outer edges of the
// blends (the kinks of the blend factor) are element edges, the grid is
// symmetric about the spine's centre, no element is wider than the coarse
// angle, the elements beyond the blends grow by at most the factor, and
// the nodes on the spine and the blends see the blend factor the wall
// description gives there.
func TestGradedEdges(t *testing.T) {
	const dc, growth = 2 * math.Pi / 20, 1.5
	near := func(edges []float64, a float64) bool {
		a = math.Mod(a+4*math.Pi, 2*math.Pi)
		for _, e := range edges {
			if math.Abs(e-a) < 1e-12 || math.Abs(e-a-2*math.Pi) < 1e-12 || math.Abs(e-a+2*math.Pi) < 1e-12 {
				return true
			}
		}
		return false
	}
	for _, c := range []struct{ h, d float64 }{{0.19, 0.23}, {0.05, 0.4}, {0.8, 0.3}, {2.8, 0.5}} {
		edges := gradedEdges(c.h, c.d, dc, 3, 4, growth)
		require.Greater(t, len(edges), 2)
		assert.Equal(t, 0.0, edges[0])
		assert.Equal(t, 2*math.Pi, edges[len(edges)-1])
		for k := 1; k < len(edges); k++ {
			w := edges[k] - edges[k-1]
			assert.Positive(t, w, "h %g d %g: edge %d ascends", c.h, c.d, k)
			assert.LessOrEqual(t, w, dc*(1+1e-12), "h %g d %g: element %d", c.h, c.d, k)
		}
		for _, a := range []float64{2 * c.h} {
			assert.True(t, near(edges, a), "h %g: spine edge", c.h)
		}
		if c.h+c.d < math.Pi {
			assert.True(t, near(edges, 2*c.h+c.d), "h %g d %g: outer blend edge", c.h, c.d)
			assert.True(t, near(edges, -c.d), "h %g d %g: outer blend edge", c.h, c.d)
			// growth beyond the blends
			for k := 1; k+1 < len(edges); k++ {
				if edges[k] < 2*c.h+c.d-1e-12 || edges[k+1] > math.Pi+c.h+1e-12 {
					continue
				}
				w0, w1 := edges[k]-edges[k-1], edges[k+1]-edges[k]
				assert.LessOrEqual(t, w1, growth*w0*(1+1e-9), "h %g d %g: element %d", c.h, c.d, k+1)
			}
		}
		for _, e := range edges {
			assert.True(t, near(edges, 2*c.h-e), "h %g d %g: mirror of %g", c.h, c.d, e)
		}
	}
	// a spined bellows' coarse shell grid: the blend factor is 0 on the
	// spine's edge columns and 1 on the blends' outer edge columns
	g := surrogate.Geometry{OuterDiameter: 0.03, Depth: 0.003, Pitch: 0.006, Wall: 0.0004, Profile: surrogate.Sinusoid, SpineWidth: 0.005, SpineAngle: 0.3}
	b := surrogate.Bellows{Geometry: g, Material: resin()}
	s := shellFor(&b, Coarse)
	phi := s.columns()
	h := g.SpineWidth / s.wall.rMean / 2
	d := g.Depth / s.wall.rMean
	for _, a := range []float64{-h, h, h + d, -h - d} {
		found := false
		for _, p := range phi {
			if math.Abs(math.Remainder(p-g.SpineAngle-a, 2*math.Pi)) < 1e-12 {
				found = true
				want := 0.0
				if math.Abs(a) > h {
					want = 1
				}
				assert.InDelta(t, want, s.spineBlend(p), 1e-9)
			}
		}
		assert.True(t, found, "a grid column at %g rad from the spine centre", a)
	}
	m := s.build()
	var sum float64
	for _, w := range m.weight {
		sum += w
	}
	assert.InDelta(t, 1, sum, 1e-12, "column weights cover the circumference once")
}

func TestReaders(t *testing.T) {
	dat := `
 displacements (vx,vy,vz) for set RINGS and time  0.1000000E+01

       513 -3.047769E-08  2.280382E-20  1.011483E-07
       514 -2.989223E-08 -5.945934E-09  1.011483E-07

 forces (fx,fy,fz) for set END1 and time  0.1000000E+01

         1  1.0E+00  2.0E+00 -3.0E+00
`
	b, err := readDat(strings.NewReader(dat))
	require.NoError(t, err)
	require.Len(t, b, 2)
	assert.Equal(t, "displacements", b[0].kind)
	assert.Equal(t, "RINGS", b[0].set)
	assert.Equal(t, []float64{514, -2.989223e-08, -5.945934e-09, 1.011483e-07}, b[0].rows[1])
	assert.Equal(t, "END1", b[1].set)
	assert.Equal(t, []float64{1, 1, 2, -3}, b[1].rows[0])

	frd := "    2C                             2                                     1\n" +
		" -1      2086 9.75000E-03-2.20446E-19 0.00000E+00\n" +
		" -1      2087 1.00000E-02 0.00000E+00 1.50000E-03\n" +
		" -3\n" +
		"  100CL  101 1.000000000           2                     0    1           1\n" +
		" -4  TOSTRAIN    6    1\n" +
		" -5  EXX         1    4    1    1\n" +
		" -1      2086 9.64274E-17 1.59480E-19-1.97596E-16 3.03914E-05 1.04192E-04-6.30840E-17\n" +
		" -3\n"
	f, err := readFrd(strings.NewReader(frd))
	require.NoError(t, err)
	assert.Equal(t, [3]float64{0.01, 0, 0.0015}, f.nodes[2087])
	assert.Equal(t, [3]float64{9.75e-3, -2.20446e-19, 0}, f.nodes[2086])
	require.Len(t, f.strains, 1)
	assert.Equal(t, 1.04192e-04, f.strains[0][2086][4])
}

// TestWriteDecks writes the decks through the caller's WriteFunc (here
// into memory): shell.inp then solid.inp, each streamed whole; an error of
// the writer stops WriteDecks with it; a bad bellows writes nothing.
func TestWriteDecks(t *testing.T) {
	b := surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: 0.03, Depth: 0.004, Pitch: 0.006, Wall: 0.0004,
		Profile: surrogate.Sinusoid, SpineWidth: 0.004}, Material: resin()}
	b.Material.ModulusInLayer = 3.2e9 // orthotropic
	decks := map[string]string{}
	mem := func(name string, write func(io.Writer) error) error {
		var buf bytes.Buffer
		if err := write(&buf); err != nil {
			return err
		}
		decks[name] = buf.String()
		return nil
	}
	files, err := WriteDecks(mem, b, Coarse)
	require.NoError(t, err)
	assert.Equal(t, []string{"shell.inp", "solid.inp"}, files)
	s := decks["shell.inp"]
	// one *GREEN step solves the four load cases (one *CLOAD line each)
	assert.Equal(t, 1, strings.Count(s, "*STEP\n"))
	assert.Equal(t, 1, strings.Count(s, "*GREEN\n*CLOAD\n"))
	assert.Equal(t, 4, strings.Count(s, "** load case "))
	assert.Equal(t, 2, strings.Count(s, "*RIGID BODY"))
	assert.Contains(t, s, "*ELEMENT, TYPE=S8R")
	assert.Contains(t, s, "TYPE=ENGINEERING CONSTANTS")
	assert.Contains(t, s, "SYSTEM=CYLINDRICAL")
	assert.True(t, strings.HasSuffix(s, "*END STEP\n"), "streamed whole")
	assert.Contains(t, decks["solid.inp"], "*ELEMENT, TYPE=CAX8")

	full := errors.New("disk full")
	calls := 0
	files, err = WriteDecks(func(name string, write func(io.Writer) error) error {
		if calls++; calls == 2 {
			return full
		}
		return nil
	}, b, Coarse)
	assert.ErrorIs(t, err, full)
	assert.Equal(t, []string{"shell.inp"}, files, "the decks written before the error")

	b.Wall = 0.01 // invalid: wall ≥ depth/2
	calls = 0
	_, err = WriteDecks(func(string, func(io.Writer) error) error { calls++; return nil }, b, Coarse)
	var ie *surrogate.InputError
	assert.ErrorAs(t, err, &ie)
	assert.Zero(t, calls)
}

func TestMissingCCX(t *testing.T) {
	b := surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: 0.03, Depth: 0.004, Pitch: 0.006, Wall: 0.0004}, Material: resin()}
	_, err := Run(context.Background(), b, Options{CCX: "plica-test-no-such-ccx"})
	require.Error(t, err)
	assert.True(t, errors.Is(err, ErrNoCCX))
	assert.Contains(t, err.Error(), "calculix-ccx")
}

// fakeCCX puts an executable script named ccx-fake on PATH.
func fakeCCX(t *testing.T, script string) {
	dir := t.TempDir()
	require.NoError(t, os.WriteFile(filepath.Join(dir, "ccx-fake"), []byte("#!/bin/sh\n"+script), 0o755))
	t.Setenv("PATH", dir+string(os.PathListSeparator)+os.Getenv("PATH"))
}

func TestCCXFailureIsOneLine(t *testing.T) {
	fakeCCX(t, "echo ' some banner'\necho ' *ERROR in e_c3d: nonpositive jacobian'\necho '        determinant in element  7'\nexit 201\n")
	dir := t.TempDir()
	_, err := runCCX(context.Background(), "ccx-fake", dir, "job", 1, nil)
	require.Error(t, err)
	assert.Equal(t, "ccx job failed: *ERROR in e_c3d: nonpositive jacobian determinant in element 7", err.Error())
	log, err := os.ReadFile(filepath.Join(dir, "job.log"))
	require.NoError(t, err)
	assert.Contains(t, string(log), "some banner")
}

func TestCCXCancel(t *testing.T) {
	fakeCCX(t, "exec sleep 30\n")
	ctx, cancel := context.WithTimeout(context.Background(), 200*time.Millisecond)
	defer cancel()
	_, err := runCCX(ctx, "ccx-fake", t.TempDir(), "job", 1, nil)
	require.Error(t, err)
	assert.ErrorIs(t, err, context.DeadlineExceeded)
}

func TestCCXProgress(t *testing.T) {
	// ccx prints " STEP n" as each step begins; each model is one step
	// (the shell model's four load cases are solved together), so only
	// step 1 is reported; the last line may lack its newline
	fakeCCX(t, "echo ' STEPS 3'\necho ' STEP            1'\necho ' STEP            2'\nprintf ' STEP 3'\n: > job.dat\n")
	var got []Progress
	opt := Options{Progress: func(p Progress) { got = append(got, p) }, level: Fine}
	_, err := runCCX(context.Background(), "ccx-fake", t.TempDir(), "job", 1, opt.steps("shell", shellCaseNames()))
	require.NoError(t, err)
	cases := []string{"axial", "torsion", "bending_x", "bending_y"}
	assert.Equal(t, []Progress{
		{Mesh: Fine, Model: "shell", Cases: cases},
		{Mesh: Fine, Model: "shell", Cases: cases, Solving: true},
	}, got)
	assert.Nil(t, (&Options{}).steps("shell", shellCaseNames()), "no callback without Progress")
}

func TestCCXInterruptedBySignal(t *testing.T) {
	// a terminal's Ctrl-C reaches ccx as well as plica: ccx dying of
	// SIGINT is an interruption, not a failure
	fakeCCX(t, "kill -INT $$\nsleep 5\n")
	_, err := runCCX(context.Background(), "ccx-fake", t.TempDir(), "job", 1, nil)
	require.Error(t, err)
	assert.ErrorIs(t, err, context.Canceled)
	assert.Equal(t, "ccx job stopped by interrupt: context canceled", err.Error())
}
