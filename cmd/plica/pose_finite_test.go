package main

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"

	"plica/objective/kinematics"
)

// TestNonFinitePose: pose names the first non-finite part of a shape (so
// that it refuses to print NaN), and passes a finite one.
func TestNonFinitePose(t *testing.T) {
	tip := kinematics.Identity()
	links := []kinematics.Link{{Start: 0, End: 0.1, U: [3]float64{1, 0, 0}}}
	poses := []kinematics.Pose{kinematics.Identity()}
	assert.Equal(t, "", nonFinitePose(tip, links, poses))

	bad := tip
	bad.P[2] = math.NaN()
	assert.Equal(t, "the tip position", nonFinitePose(bad, links, poses))
	bad = tip
	bad.R[1][1] = math.Inf(1)
	assert.Equal(t, "the tip orientation", nonFinitePose(bad, links, poses))
	badLinks := []kinematics.Link{links[0], {Start: 0.1, End: 0.2, U: [3]float64{math.NaN(), 0, 0}}}
	assert.Equal(t, "link 2", nonFinitePose(tip, badLinks, poses))
	badPoses := []kinematics.Pose{kinematics.Identity(), {P: [3]float64{0, math.Inf(-1), 0}}}
	assert.Equal(t, "the backbone", nonFinitePose(tip, links, badPoses))
}
