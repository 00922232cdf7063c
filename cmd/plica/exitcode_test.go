package main

import (
	"context"
	"errors"
	"fmt"
	"testing"

	"github.com/stretchr/testify/assert"

	"plica/problems"
	"plica/results"
)

// TestExitCodeInputErrors: every kind of input error, wrapped or not, maps
// to exit status 2 through the one predicate problems.ErrInput.
func TestExitCodeInputErrors(t *testing.T) {
	fileErr := &problems.Error{File: "p.toml", Line: 3, Col: 1, Key: "wall_mm", Msg: "bad"}
	for name, err := range map[string]error{
		"usage":            usagef("-o: missing"),
		"file":             fileErr,
		"file list":        problems.Errors{fileErr},
		"wrapped file":     fmt.Errorf("loading: %w", fileErr),
		"runs given":       &results.InputError{Err: errors.New("not a run folder")},
		"wrapped runs":     fmt.Errorf("merge: %w", &results.InputError{Err: errors.New("x")}),
		"joined with more": errors.Join(errors.New("other"), fileErr),
	} {
		assert.True(t, errors.Is(err, problems.ErrInput), name)
		assert.Equal(t, exitUsage, exitCode(err), name)
	}
	assert.Equal(t, exitFail, exitCode(errors.New("disk full")))
	assert.Equal(t, exitInterrupt, exitCode(fmt.Errorf("search: %w", context.Canceled)))
	assert.Equal(t, exitOK, exitCode(nil))
	assert.Equal(t, exitInterrupt, exitCode(&reported{fmt.Errorf("search: %w", context.Canceled)}), "an error already told keeps its status")
}
