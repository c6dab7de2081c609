package server

import (
	"container/list"
	"sync"

	"wardload/internal/wardload"
	"wardload/web"
)

// projectionCacheSize bounds the projection page cache. An entry is a few
// kilobytes (the page's strings and chart geometry, not the stored Input
// and Result), so the cache stays around a megabyte.
const projectionCacheSize = 256

// projectionKey names a cached projection page. The ward's code, name and
// time zone are part of it because the page shows them (and the shift
// times in that zone): a ward renamed elsewhere, perhaps by another server
// process, simply misses, and the stale entry ages out.
type projectionKey struct {
	ID       int64
	WardID   int64
	WardCode string
	WardName string
	TimeZone string
}

// projectionPage is the part of a projection page that depends only on
// the projection and its ward: everything but the signed-in user's links
// and the census revisions of the shift, which change and are read anew
// on every request.
type projectionPage struct {
	p     *wardload.Projection // without Input and Result
	title string
	vm    web.ProjectionVM // SettingsURL, Revisions, NewerURL unset
	// Rendered HTML of web.ProjectionTitle and web.ProjectionBody; the
	// body once without and once with the link to the ward settings.
	titleHTML string
	bodyHTML  [2]string
}

// projectionCache is a bounded LRU of projection pages. Caching is safe
// across processes because a stored projection never changes (the store
// has no update or delete of one; a correction is a new census revision
// with a new projection). Only pages that were found and belong to the
// key's ward are added, so a miss always goes to the store.
type projectionCache struct {
	mu    sync.Mutex
	max   int
	order *list.List // of *projectionEntry, most recently used first
	byKey map[projectionKey]*list.Element
}

type projectionEntry struct {
	key  projectionKey
	page *projectionPage
}

func newProjectionCache(max int) *projectionCache {
	return &projectionCache{max: max, order: list.New(), byKey: map[projectionKey]*list.Element{}}
}

// get returns the cached page of k, if any. The page is shared: callers
// copy its vm before filling in the per-request fields.
func (c *projectionCache) get(k projectionKey) (*projectionPage, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	e, ok := c.byKey[k]
	if !ok {
		return nil, false
	}
	c.order.MoveToFront(e)
	return e.Value.(*projectionEntry).page, true
}

// add caches pg as k, evicting the least recently used page when full.
func (c *projectionCache) add(k projectionKey, pg *projectionPage) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if e, ok := c.byKey[k]; ok {
		e.Value.(*projectionEntry).page = pg
		c.order.MoveToFront(e)
		return
	}
	c.byKey[k] = c.order.PushFront(&projectionEntry{key: k, page: pg})
	for c.order.Len() > c.max {
		last := c.order.Back()
		c.order.Remove(last)
		delete(c.byKey, last.Value.(*projectionEntry).key)
	}
}

// len returns the number of cached pages.
func (c *projectionCache) len() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.order.Len()
}
