package plot

// thin returns the members of idx (indices into y, increasing) to draw,
// at most limit of them. When idx is longer, it is cut into limit/2
// buckets of consecutive members and each bucket gives the index of its
// lowest and of its highest y, in index order (one index when they are the
// same), so the outline of the noise and any lone excursion survive; pairs
// then holds each bucket's two indices (lowest, highest) for drawing the
// bucket's range, and is nil when nothing was thinned.
func thin(idx []int, y []float64, limit int) (drawn []int, pairs [][2]int) {
	if len(idx) <= limit {
		return idx, nil
	}
	buckets := max(limit/2, 1)
	drawn = make([]int, 0, 2*buckets)
	pairs = make([][2]int, 0, buckets)
	for b := range buckets {
		lo, hi := b*len(idx)/buckets, (b+1)*len(idx)/buckets
		if lo >= hi {
			continue
		}
		imin, imax := idx[lo], idx[lo]
		for _, i := range idx[lo+1 : hi] {
			if y[i] < y[imin] {
				imin = i
			}
			if y[i] > y[imax] {
				imax = i
			}
		}
		pairs = append(pairs, [2]int{imin, imax})
		switch {
		case imin == imax:
			drawn = append(drawn, imin)
		case imin < imax:
			drawn = append(drawn, imin, imax)
		default:
			drawn = append(drawn, imax, imin)
		}
	}
	return drawn, pairs
}
