package projector

import (
	"fmt"
	"slices"
	"testing"
)

// TestPageCacheEvicts: the cache keeps at most its size, dropping the
// least recently used value.
func TestPageCacheEvicts(t *testing.T) {
	c := NewPageCache[string](2)
	k := func(id int64) PageKey { return PageKey{ID: id, WardID: 1} }
	for id := int64(1); id <= 2; id++ {
		c.Add(k(id), fmt.Sprint(id))
	}
	c.Get(k(1)) // 2 is now the least recently used
	c.Add(k(3), "3")
	var kept []int64
	for id := int64(1); id <= 3; id++ {
		if pg, ok := c.Get(k(id)); ok {
			if pg != fmt.Sprint(id) {
				t.Errorf("value %d is %q", id, pg)
			}
			kept = append(kept, id)
		}
	}
	if !slices.Equal(kept, []int64{1, 3}) || c.Len() != 2 {
		t.Errorf("kept %v (len %d), want [1 3]", kept, c.Len())
	}
	if _, ok := c.Get(PageKey{ID: 1, WardID: 2}); ok {
		t.Error("a value of ward 1 found under ward 2")
	}
}
