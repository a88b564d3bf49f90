package rips

// pivotTable maps the pivot simplex of each reduced column (its index) to
// a value, by open addressing with linear probing. Only inserts and
// look-ups are needed; lookups may run concurrently once inserts stop.
type pivotTable struct {
	keys  []uint64 // simplex index + 1; 0 marks an empty slot
	vals  []uint64
	mask  uint64
	shift uint
	count int
}

func newPivotTable(hint int) *pivotTable {
	t := &pivotTable{}
	size := 16
	for size < 2*hint {
		size *= 2
	}
	t.alloc(size)
	return t
}

func (t *pivotTable) alloc(size int) {
	t.keys = make([]uint64, size)
	t.vals = make([]uint64, size)
	t.mask = uint64(size - 1)
	t.shift = 64
	for s := size; s > 1; s >>= 1 {
		t.shift--
	}
}

// slot is the home position of key: Fibonacci hashing.
func (t *pivotTable) slot(key uint64) uint64 {
	return (key * 0x9e3779b97f4a7c15) >> t.shift
}

// get returns the value stored for simplex idx.
func (t *pivotTable) get(idx uint64) (uint64, bool) {
	key := idx + 1
	for i := t.slot(key); ; i = (i + 1) & t.mask {
		switch t.keys[i] {
		case key:
			return t.vals[i], true
		case 0:
			return 0, false
		}
	}
}

// has reports whether simplex idx is a pivot.
func (t *pivotTable) has(idx uint64) bool {
	_, ok := t.get(idx)
	return ok
}

// put stores val for simplex idx, which must not be present yet.
func (t *pivotTable) put(idx, val uint64) {
	if 2*(t.count+1) > len(t.keys) {
		oldK, oldV := t.keys, t.vals
		t.alloc(2 * len(oldK))
		for i, k := range oldK {
			if k != 0 {
				t.insert(k, oldV[i])
			}
		}
	}
	t.insert(idx+1, val)
	t.count++
}

func (t *pivotTable) insert(key, val uint64) {
	i := t.slot(key)
	for t.keys[i] != 0 {
		i = (i + 1) & t.mask
	}
	t.keys[i] = key
	t.vals[i] = val
}

// bytes is the memory the table holds.
func (t *pivotTable) bytes() int64 { return int64(len(t.keys)) * 16 }
