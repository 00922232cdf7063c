package results

import (
	"encoding/json"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/search"
)

// TestRunInfoJSON: run.json keeps its text form: the status by name, the
// time budget as Go duration text, an empty budget (merged runs before
// typed budgets) as none.
func TestRunInfoJSON(t *testing.T) {
	var info RunInfo
	require.NoError(t, json.Unmarshal([]byte(`{"program":"plica","status":"EvaluationLimit","time_budget":"10m0s","seed":3}`), &info))
	assert.Equal(t, StatusEvaluationLimit, info.Status)
	assert.Equal(t, 10*time.Minute, info.TimeBudget)
	assert.Equal(t, uint64(3), info.Seed)
	b, err := json.Marshal(info)
	require.NoError(t, err)
	var m map[string]any
	require.NoError(t, json.Unmarshal(b, &m))
	assert.Equal(t, "EvaluationLimit", m["status"])
	assert.Equal(t, "10m0s", m["time_budget"])

	var merged RunInfo
	require.NoError(t, json.Unmarshal([]byte(`{"status":"merged","time_budget":""}`), &merged))
	assert.Equal(t, StatusMerged, merged.Status)
	assert.Zero(t, merged.TimeBudget)

	assert.ErrorContains(t, json.Unmarshal([]byte(`{"status":"finished"}`), &info), `unknown run status "finished"`)
	assert.ErrorContains(t, json.Unmarshal([]byte(`{"status":"running","time_budget":"soon"}`), &info), `time_budget "soon"`)
}

// TestRunStatusOfSearch: every search status has its run status, named as
// search names it; only the stopping rules count as finished.
func TestRunStatusOfSearch(t *testing.T) {
	for s := search.NotTerminated; s <= search.Failure; s++ {
		rs := StatusOf(s)
		assert.Equal(t, s.String(), rs.String(), "name of %v", s)
		text, err := rs.MarshalText()
		require.NoError(t, err)
		var back RunStatus
		require.NoError(t, back.UnmarshalText(text))
		assert.Equal(t, rs, back, "round trip of %v", s)
		want := s == search.EvaluationLimit || s == search.RuntimeLimit || s == search.Stalled || s == search.Converged
		assert.Equal(t, want, rs.Finished(), "finished: %v", s)
	}
	assert.False(t, StatusRunning.Finished())
	assert.False(t, StatusMerged.Finished())
}
