package results

import (
	"errors"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/search"
)

// TestPersisterOrderAndFirstError: jobs run in the order given; after the first that fails no
// other runs, and Err and Wait return that job's error.
func TestPersisterOrderAndFirstError(t *testing.T) {
	p := newPersister()
	var ran []int
	first := errors.New("disk full")
	for i := range 40 { // more than the queue holds
		p.Do(func() error {
			ran = append(ran, i)
			if i == 30 {
				return first
			}
			if i == 35 {
				return errors.New("later")
			}
			return nil
		})
	}
	require.ErrorIs(t, p.Wait(), first)
	assert.ErrorIs(t, p.Err(), first)
	want := make([]int, 31)
	for i := range want {
		want[i] = i
	}
	assert.Equal(t, want, ran, "jobs 0 to 30 in order, none after the failure")
}

// TestDesignBatchCopies: the batch keeps the designs as they were when added, whatever the
// search does with its own afterwards.
func TestDesignBatchCopies(t *testing.T) {
	var b designBatch
	d := &search.Design{Index: 7, X: []float64{1, 2, 3}, F: []float64{4, 5}, G: []float64{6}, CV: 0.5, Failed: "why"}
	e := &search.Design{Index: 8, X: []float64{9, 8, 7}, F: []float64{6, 5}, G: []float64{}, CV: 0}
	b.add(d)
	b.add(e)
	d.X[0], d.F[1], d.G[0], e.X[2] = -1, -1, -1, -1
	ds := b.designs()
	require.Len(t, ds, 2)
	assert.Equal(t, int64(7), ds[0].Index)
	assert.Equal(t, []float64{1, 2, 3}, ds[0].X)
	assert.Equal(t, []float64{4, 5}, ds[0].F)
	assert.Equal(t, []float64{6}, ds[0].G)
	assert.Equal(t, 0.5, ds[0].CV)
	assert.Equal(t, "why", ds[0].Failed)
	assert.Equal(t, []float64{9, 8, 7}, ds[1].X)
	assert.Equal(t, []float64{6, 5}, ds[1].F)
	assert.Empty(t, ds[1].G)
	assert.True(t, ds[1].Feasible())
}
