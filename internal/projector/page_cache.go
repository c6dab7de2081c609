package projector

import (
	"container/list"
	"sync"

	"wardload/internal/wardload"
)

// PageKey names what is cached of one stored projection as shown for one
// ward. The ward's code, name and time zone are part of it because a page
// shows them (and the shift times in that zone): a ward renamed elsewhere,
// perhaps by another server process, simply misses, and the stale entry
// ages out.
type PageKey struct {
	ID       int64
	WardID   int64
	WardCode string
	WardName string
	TimeZone string
}

// KeyFor is the key of projection id shown for ward.
func KeyFor(ward *wardload.Ward, id int64) PageKey {
	return PageKey{ID: id, WardID: ward.ID, WardCode: ward.Code, WardName: ward.Name, TimeZone: ward.TimeZone}
}

// PageCache is a bounded LRU of what a caller derives from a stored
// projection (the server keeps its rendered pages). Caching is safe across
// processes because a stored projection never changes (the store has no
// update or delete of one; a correction is a new census revision with a
// new projection). Callers add only values that were found and belong to
// the key's ward, so a miss always goes to the store.
type PageCache[V any] struct {
	mu    sync.Mutex
	max   int
	order *list.List // of *pageEntry[V], most recently used first
	byKey map[PageKey]*list.Element
}

type pageEntry[V any] struct {
	key  PageKey
	page V
}

// NewPageCache returns a cache of at most max values.
func NewPageCache[V any](max int) *PageCache[V] {
	return &PageCache[V]{max: max, order: list.New(), byKey: map[PageKey]*list.Element{}}
}

// Get returns the cached value of k, if any. The value is shared: callers
// copy what they fill in per request.
func (c *PageCache[V]) Get(k PageKey) (V, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	e, ok := c.byKey[k]
	if !ok {
		var zero V
		return zero, false
	}
	c.order.MoveToFront(e)
	return e.Value.(*pageEntry[V]).page, true
}

// Add caches v as k, evicting the least recently used value when full.
func (c *PageCache[V]) Add(k PageKey, v V) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if e, ok := c.byKey[k]; ok {
		e.Value.(*pageEntry[V]).page = v
		c.order.MoveToFront(e)
		return
	}
	c.byKey[k] = c.order.PushFront(&pageEntry[V]{key: k, page: v})
	for c.order.Len() > c.max {
		last := c.order.Back()
		c.order.Remove(last)
		delete(c.byKey, last.Value.(*pageEntry[V]).key)
	}
}

// Len returns the number of cached values.
func (c *PageCache[V]) Len() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.order.Len()
}
