package sparse

// amd returns a fill-reducing ordering of the symmetric pattern given by
// the adjacency lists ptr/adj. Approximate minimum degree is being written;
// until then this keeps the natural order.
func amd(n int, ptr, adj []int) []int {
	p := make([]int, n)
	for i := range p {
		p[i] = i
	}
	return p
}
