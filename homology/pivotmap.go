// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

// pivotMap maps the index of a pivot simplex to the column that has it
// as pivot and the pivot's coefficient. It uses open addressing with
// linear probing on uint64 keys (index+1; 0 marks an empty slot).
type pivotMap struct {
	keys  []uint64
	vals  []uint64 // column<<16 | coefficient
	mask  uint64
	count int
}

func newPivotMap(hint int) *pivotMap {
	size := 16
	for size < 2*hint {
		size <<= 1
	}
	return &pivotMap{keys: make([]uint64, size), vals: make([]uint64, size), mask: uint64(size - 1)}
}

func hashIndex(k uint64) uint64 {
	k ^= k >> 33
	k *= 0xff51afd7ed558ccd
	k ^= k >> 33
	return k
}

func (m *pivotMap) get(idx int64) (col int, coef int64, ok bool) {
	k := uint64(idx) + 1
	for h := hashIndex(k) & m.mask; ; h = (h + 1) & m.mask {
		switch m.keys[h] {
		case k:
			v := m.vals[h]
			return int(v >> 16), int64(v & 0xffff), true
		case 0:
			return 0, 0, false
		}
	}
}

func (m *pivotMap) has(idx int64) bool {
	_, _, ok := m.get(idx)
	return ok
}

func (m *pivotMap) put(idx int64, col int, coef int64) {
	if 2*(m.count+1) > len(m.keys) {
		m.grow()
	}
	k := uint64(idx) + 1
	for h := hashIndex(k) & m.mask; ; h = (h + 1) & m.mask {
		if m.keys[h] == 0 || m.keys[h] == k {
			if m.keys[h] == 0 {
				m.count++
			}
			m.keys[h] = k
			m.vals[h] = uint64(col)<<16 | uint64(coef)
			return
		}
	}
}

func (m *pivotMap) grow() {
	old, oldv := m.keys, m.vals
	m.keys = make([]uint64, 2*len(old))
	m.vals = make([]uint64, 2*len(old))
	m.mask = uint64(len(m.keys) - 1)
	m.count = 0
	for h, k := range old {
		if k != 0 {
			v := oldv[h]
			m.put(int64(k-1), int(v>>16), int64(v&0xffff))
		}
	}
}
