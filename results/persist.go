package results

import (
	"sync"

	"plica/search"
)

// persister does a search's file work (evaluations.csv rows, checkpoints,
// history.csv, run.json) on a goroutine of its own, job by job in the
// order given, while the search evaluates the next generation. Done on
// the search's goroutine, this work (and the disk's fsync latency) left
// every worker idle once a generation (DEVELOPERS.md, "Search speed").
//
// The order of the jobs keeps the folder consistent at any moment: a
// checkpoint is written only after the rows it counts are in
// evaluations.csv and synced. After the first job that fails no other
// job runs; Err and Wait return that job's error.
type persister struct {
	jobs chan func() error
	done chan struct{}

	mu  sync.Mutex
	err error
}

// persisterQueue bounds the jobs waiting: a disk slower than the search
// makes the search wait rather than hold an unbounded backlog in memory.
const persisterQueue = 16

func newPersister() *persister {
	p := &persister{jobs: make(chan func() error, persisterQueue), done: make(chan struct{})}
	go func() {
		defer close(p.done)
		for job := range p.jobs {
			if p.Err() != nil {
				continue
			}
			if err := job(); err != nil {
				p.mu.Lock()
				p.err = err
				p.mu.Unlock()
			}
		}
	}()
	return p
}

// Do queues a job.
func (p *persister) Do(job func() error) { p.jobs <- job }

// Err is the error of the first job that failed so far, or nil.
func (p *persister) Err() error {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.err
}

// Wait runs the jobs still queued, stops the goroutine and returns Err.
// Nothing may be queued after it.
func (p *persister) Wait() error {
	close(p.jobs)
	<-p.done
	return p.Err()
}

// designBatch copies the evaluated designs of one generation for the
// persister: the search's Evaluated hook may not retain its designs.
type designBatch struct {
	ds  []search.Design
	off []int // where each design's X, F and G start in num
	num []float64
	n   int // variables and objectives per design (the same for all)
	m   int
}

// add copies d into the batch.
func (b *designBatch) add(d *search.Design) {
	b.n, b.m = len(d.X), len(d.F)
	b.off = append(b.off, len(b.num))
	b.num = append(append(append(b.num, d.X...), d.F...), d.G...)
	cp := *d
	cp.X, cp.F, cp.G = nil, nil, nil
	b.ds = append(b.ds, cp)
}

// designs returns the batch's designs, their numbers in num (the slices
// are set only now, since appending to num may have moved it).
func (b *designBatch) designs() []search.Design {
	n, m := b.n, b.m
	for i := range b.ds {
		o := b.off[i]
		end := len(b.num)
		if i+1 < len(b.off) {
			end = b.off[i+1]
		}
		b.ds[i].X = b.num[o : o+n : o+n]
		b.ds[i].F = b.num[o+n : o+n+m : o+n+m]
		b.ds[i].G = b.num[o+n+m : end : end]
	}
	return b.ds
}
