package external

import (
	"sync"
	"sync/atomic"
)

// cache keeps the answers of runs by the hash of their input, and lets
// workers asking for the same input at once wait for one run.
type cache struct {
	mu   sync.Mutex
	done map[string]*call
	busy map[string]*call
	runs atomic.Int64
}

// call is a run in progress.
type call struct {
	wait chan struct{}
	vals []float64
	err  error
}

// newCache returns an empty cache.
func newCache() *cache {
	return &cache{done: map[string]*call{}, busy: map[string]*call{}}
}

// get returns the answer for key, running run once when there is none.
// A failure (after its retries) is kept like an answer: the program is
// deterministic in its input, and a coupled solver's fallback chain asks
// again for the same input, which would otherwise cost the time limit
// again.
func (c *cache) get(key string, run func() ([]float64, error)) ([]float64, error) {
	c.mu.Lock()
	if cl, ok := c.done[key]; ok {
		c.mu.Unlock()
		return cl.vals, cl.err
	}
	if cl, ok := c.busy[key]; ok {
		c.mu.Unlock()
		<-cl.wait
		return cl.vals, cl.err
	}
	cl := &call{wait: make(chan struct{})}
	c.busy[key] = cl
	c.mu.Unlock()

	cl.vals, cl.err = run()
	c.mu.Lock()
	delete(c.busy, key)
	c.done[key] = cl

	c.mu.Unlock()
	close(cl.wait)
	return cl.vals, cl.err
}
