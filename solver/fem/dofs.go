package fem

import (
	"fmt"
	"sort"
)

// Field names one of the nodal unknown fields.
type Field int

// The nodal fields. Displacement lives on every node; the linear fields live
// on corner nodes only, and each pair exists only when it is switched on.
const (
	Ux       Field = iota // displacement component 1 (x or r)
	Uy                    // displacement component 2 (y or z)
	Theta                 // volume variable θ (mixed formulation)
	Pressure              // its multiplier P (mixed formulation)
	Abar                  // non-local plastic strain ā (regularisation)
	Lambda                // its multiplier λ (regularisation)
	NumFields
)

var fieldNames = [NumFields]string{"ux", "uy", "theta", "P", "abar", "lambda"}

// String returns the short name of the field (ux, uy, theta, P, abar, lambda).
func (f Field) String() string {
	if f < 0 || f >= NumFields {
		return fmt.Sprintf("Field(%d)", int(f))
	}
	return fieldNames[f]
}

// Dofs numbers the unknowns of a mesh. The unknowns of one node are
// contiguous (node-wise interleaving: ux, uy, then θ, P, then ā, λ on corner
// nodes when switched on), and the nodes are taken in reverse Cuthill–McKee
// order (Cuthill & McKee 1969; George 1971) so that the bandwidth stays
// small even though the mesh numbers corner nodes before midside nodes.
// The sparse factorisation reorders again for fill; the node-wise blocks
// keep the multiplier unknowns (P, λ, zero diagonal) next to the unknowns
// they pair with.
type Dofs struct {
	Mixed       bool // θ and P present
	Regularised bool // ā and λ present
	// Start[n] is the first unknown of node n; node n has Count(n) unknowns.
	Start []int
	// N is the total number of unknowns.
	N int
	// FieldOf[d] is the field of unknown d; NodeOf[d] its node.
	FieldOf []Field
	NodeOf  []int
	// Order lists the nodes in numbering order.
	Order      []int
	numCorners int
	offset     [NumFields]int // offset of each field within a corner node, -1 if absent
}

// NewDofs numbers the unknowns of m with the given fields switched on.
func NewDofs(m *Mesh, mixed, regularised bool) (*Dofs, error) {
	if err := m.Check(); err != nil {
		return nil, err
	}
	d := &Dofs{Mixed: mixed, Regularised: regularised, numCorners: m.NumCorners}
	for f := range d.offset {
		d.offset[f] = -1
	}
	d.offset[Ux], d.offset[Uy] = 0, 1
	k := 2
	if mixed {
		d.offset[Theta], d.offset[Pressure] = k, k+1
		k += 2
	}
	if regularised {
		d.offset[Abar], d.offset[Lambda] = k, k+1
	}
	nn := len(m.X)
	adjPtr, adj := nodeGraph(m)
	d.Order = rcmOrder(nn, adjPtr, adj)
	d.Start = make([]int, nn)
	n := 0
	for _, node := range d.Order {
		d.Start[node] = n
		n += d.Count(node)
	}
	d.N = n
	d.FieldOf = make([]Field, n)
	d.NodeOf = make([]int, n)
	for node := 0; node < nn; node++ {
		for f := Field(0); f < NumFields; f++ {
			if g := d.Of(node, f); g >= 0 {
				d.FieldOf[g] = f
				d.NodeOf[g] = node
			}
		}
	}
	return d, nil
}

// CornerCount returns the number of unknowns of a corner node.
func (d *Dofs) CornerCount() int {
	c := 2
	if d.Mixed {
		c += 2
	}
	if d.Regularised {
		c += 2
	}
	return c
}

// Count returns the number of unknowns of node n.
func (d *Dofs) Count(n int) int {
	if n < d.numCorners {
		return d.CornerCount()
	}
	return 2
}

// Of returns the unknown of field f at node n, or -1 if the node does not
// carry that field.
func (d *Dofs) Of(n int, f Field) int {
	if f < 0 || f >= NumFields || d.offset[f] < 0 {
		return -1
	}
	if f > Uy && n >= d.numCorners {
		return -1
	}
	return d.Start[n] + d.offset[f]
}

// Has reports whether field f is switched on.
func (d *Dofs) Has(f Field) bool { return f >= 0 && f < NumFields && d.offset[f] >= 0 }

// nodeGraph returns the node adjacency (nodes sharing a triangle, the node
// itself included) in compressed form with sorted neighbour lists.
func nodeGraph(m *Mesh) (ptr, adj []int) {
	nn := len(m.X)
	// Over-allocate per node by counting incident triangles × 6, then
	// deduplicate.
	cnt := make([]int, nn+1)
	for _, t := range m.Tri {
		for _, a := range t {
			cnt[a+1] += 6
		}
	}
	for i := 0; i < nn; i++ {
		cnt[i+1] += cnt[i]
	}
	raw := make([]int, cnt[nn])
	fill := make([]int, nn)
	copy(fill, cnt[:nn])
	for _, t := range m.Tri {
		for _, a := range t {
			for _, b := range t {
				raw[fill[a]] = b
				fill[a]++
			}
		}
	}
	ptr = make([]int, nn+1)
	adj = raw[:0:0]
	out := make([]int, 0, len(raw)/3+nn)
	for i := 0; i < nn; i++ {
		row := raw[cnt[i]:fill[i]]
		sort.Ints(row)
		prev := -1
		for _, b := range row {
			if b != prev {
				out = append(out, b)
				prev = b
			}
		}
		if len(row) == 0 { // isolated node: couples to itself only
			out = append(out, i)
		}
		ptr[i+1] = len(out)
	}
	adj = out
	return ptr, adj
}

// rcmOrder returns a reverse Cuthill–McKee ordering of the graph, one
// breadth-first sweep per connected component, each started from a
// pseudo-peripheral node (George & Liu 1979).
func rcmOrder(nn int, ptr, adj []int) []int {
	deg := func(i int) int { return ptr[i+1] - ptr[i] }
	visited := make([]bool, nn)
	order := make([]int, 0, nn)
	level := make([]int, nn)
	bfsFar := func(s int) (int, int) {
		// returns the last node reached (min degree in the last level) and the depth
		for i := range level {
			level[i] = -1
		}
		queue := []int{s}
		level[s] = 0
		far, depth := s, 0
		for h := 0; h < len(queue); h++ {
			v := queue[h]
			for _, w := range adj[ptr[v]:ptr[v+1]] {
				if level[w] < 0 {
					level[w] = level[v] + 1
					queue = append(queue, w)
				}
			}
		}
		for _, v := range queue {
			if level[v] > depth || (level[v] == depth && deg(v) < deg(far)) {
				far, depth = v, level[v]
			}
		}
		return far, depth
	}
	var nb []int
	for s0 := 0; s0 < nn; s0++ {
		if visited[s0] {
			continue
		}
		s, d := bfsFar(s0)
		for it := 0; it < 4; it++ {
			s2, d2 := bfsFar(s)
			if d2 <= d {
				break
			}
			s, d = s2, d2
		}
		start := len(order)
		order = append(order, s)
		visited[s] = true
		for h := start; h < len(order); h++ {
			v := order[h]
			nb = nb[:0]
			for _, w := range adj[ptr[v]:ptr[v+1]] {
				if !visited[w] {
					visited[w] = true
					nb = append(nb, w)
				}
			}
			sort.Slice(nb, func(a, b int) bool { return deg(nb[a]) < deg(nb[b]) })
			order = append(order, nb...)
		}
	}
	for i, j := 0, len(order)-1; i < j; i, j = i+1, j-1 {
		order[i], order[j] = order[j], order[i]
	}
	return order
}
