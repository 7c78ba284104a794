package sparse

import "math"

// amd returns a fill-reducing ordering of the symmetric pattern given by
// the adjacency lists ptr/adj (no diagonal, each edge in both lists):
// perm[k] is the node eliminated k-th.
//
// The method is approximate minimum degree (Amestoy, Davis & Duff 1996,
// SIAM J. Matrix Anal. Appl. 17, "An approximate minimum degree ordering
// algorithm"): elimination on the quotient graph of variables and
// elements, approximate external degrees from |Le \ Lp|, supervariables
// found by hashing, mass elimination and aggressive element absorption.
// Nodes of degree above 10√n are ordered last, as that paper recommends
// for dense rows.
//
// weight, if not nil, gives each node the number of matrix variables it
// stands for (a compressed graph); degrees are then counted in variables.
func amd(n int, ptr, adj []int, weight []int) []int {
	const (
		isVar = iota
		isElement
		isDead // non-principal supervariable, absorbed element, or eliminated
	)
	perm := make([]int, 0, n)
	if n == 0 {
		return perm
	}
	dense := max(16, int(10*math.Sqrt(float64(n))))
	state := make([]uint8, n)
	nv := make([]int, n)   // supervariable size (negated while in Lp)
	deg := make([]int, n)  // approximate external degree of a variable
	dege := make([]int, n) // |Le| (weighted) of an element
	elen := make([]int, n) // elements at the front of a variable's list
	pe := make([]int, n)   // list start in iw
	ln := make([]int, n)   // list length
	w := make([]int, n)    // |Le \ Lp| + wflg during a step
	total := n
	if weight != nil {
		total = 0
		for _, x := range weight {
			total += x
		}
	}
	head := make([]int, total+1) // degree lists
	next := make([]int, n)
	prev := make([]int, n)
	hhead := make([]int, n) // hash buckets
	hnext := make([]int, n)
	mfirst := make([]int, n) // members merged into a principal variable
	mnext := make([]int, n)
	mlast := make([]int, n)
	isDense := make([]bool, n)

	for i := range head {
		head[i] = -1
	}
	for i := 0; i < n; i++ {
		hhead[i], mfirst[i], mnext[i] = -1, -1, -1
		mlast[i] = i
		nv[i] = 1
		if weight != nil {
			nv[i] = weight[i]
		}
		isDense[i] = ptr[i+1]-ptr[i] > dense && n > 2
	}
	iw := make([]int, 0, len(adj)+len(adj)/2+4*n)
	for i := 0; i < n; i++ {
		pe[i] = len(iw)
		if isDense[i] {
			state[i] = isDead
			continue
		}
		for _, j := range adj[ptr[i]:ptr[i+1]] {
			if !isDense[j] {
				iw = append(iw, j)
			}
		}
		ln[i] = len(iw) - pe[i]
	}
	insert := func(i int) {
		d := deg[i]
		prev[i] = -1
		next[i] = head[d]
		if head[d] >= 0 {
			prev[head[d]] = i
		}
		head[d] = i
	}
	remove := func(i int) {
		if prev[i] >= 0 {
			next[prev[i]] = next[i]
		} else {
			head[deg[i]] = next[i]
		}
		if next[i] >= 0 {
			prev[next[i]] = prev[i]
		}
	}
	nel := 0
	for i := 0; i < n; i++ {
		if isDense[i] {
			nel += nv[i]
			continue
		}
		d := 0
		for _, j := range iw[pe[i] : pe[i]+ln[i]] {
			d += nv[j]
		}
		deg[i] = min(d, total-nv[i])
		insert(i)
	}
	// emit appends principal variable i and its merged members to perm.
	emit := func(i int) {
		perm = append(perm, i)
		for j := mfirst[i]; j >= 0; j = mnext[j] {
			perm = append(perm, j)
		}
	}
	// compact rewrites iw keeping only live lists.
	compact := func(extra int) {
		live := 0
		for i := 0; i < n; i++ {
			if state[i] != isDead {
				live += ln[i]
			}
		}
		niw := make([]int, 0, 2*(live+extra)+n)
		for i := 0; i < n; i++ {
			if state[i] != isDead {
				s := pe[i]
				pe[i] = len(niw)
				niw = append(niw, iw[s:s+ln[i]]...)
			}
		}
		iw = niw
	}

	lp := make([]int, 0, n)  // the new element's variables
	tmp := make([]int, 0, n) // scratch copy of a variable's list
	wflg := 1
	mindeg := 0
	for nel < total {
		// Pivot: a variable of least approximate degree.
		for mindeg < total && head[mindeg] < 0 {
			mindeg++
		}
		if mindeg >= total {
			break
		}
		me := head[mindeg]
		remove(me)
		nvp := nv[me]
		nel += nvp

		// Lp = (me's variables ∪ variables of me's elements) \ {me}.
		lp = lp[:0]
		degme := 0
		nv[me] = -nvp
		addVar := func(i int) {
			if state[i] == isVar && nv[i] > 0 {
				degme += nv[i]
				nv[i] = -nv[i]
				lp = append(lp, i)
				remove(i)
			}
		}
		lst := iw[pe[me] : pe[me]+ln[me]]
		for _, e := range lst[:elen[me]] {
			if state[e] != isElement {
				continue
			}
			for _, i := range iw[pe[e] : pe[e]+ln[e]] {
				addVar(i)
			}
			state[e] = isDead // absorbed into me
		}
		for _, i := range lst[elen[me]:] {
			addVar(i)
		}
		emit(me)
		state[me] = isElement
		nv[me] = nvp
		elen[me] = 0

		// |Le \ Lp| for the elements adjacent to Lp.
		if wflg > math.MaxInt/2 {
			clear(w)
			wflg = 1
		}
		for _, i := range lp {
			nvi := -nv[i]
			for _, e := range iw[pe[i] : pe[i]+elen[i]] {
				if state[e] != isElement {
					continue
				}
				if w[e] < wflg {
					w[e] = dege[e] + wflg
				}
				w[e] -= nvi
			}
		}

		// Degree update, list pruning and hashing of each i ∈ Lp.
		for _, i := range lp {
			nvi := -nv[i]
			oldElen := elen[i]
			tmp = append(tmp[:0], iw[pe[i]:pe[i]+ln[i]]...)
			out := pe[i]
			iw[out] = me
			out++
			de, h := 0, me
			for _, e := range tmp[:oldElen] {
				if state[e] != isElement || e == me {
					continue
				}
				ext := w[e] - wflg
				if ext == 0 {
					state[e] = isDead // aggressive absorption: Le ⊆ Lp
					continue
				}
				de += ext
				h += e
				iw[out] = e
				out++
			}
			elen[i] = out - pe[i]
			da := 0
			for _, j := range tmp[oldElen:] {
				// Keep principal variables not in Lp (those are reached
				// through me now).
				if state[j] != isVar || nv[j] <= 0 {
					continue
				}
				da += nv[j]
				h += j
				iw[out] = j
				out++
			}
			ln[i] = out - pe[i]
			if elen[i] == 1 && ln[i] == 1 {
				// Mass elimination: i is adjacent to me only.
				state[i] = isDead
				nel += nvi
				nv[i] = 0
				emit(i)
				continue
			}
			d := min(deg[i]+degme-nvi, da+de+degme-nvi)
			deg[i] = max(1, d)
			h %= n
			hnext[i] = hhead[h]
			hhead[h] = i
			w[i] = h // bucket, remembered for the detection below
		}

		// Supervariables: variables of Lp with identical lists (found by
		// hashing, then compared) are merged.
		wflg += total + 1
		for _, i := range lp {
			if state[i] != isVar || nv[i] == 0 {
				continue
			}
			h := w[i]
			if hhead[h] < 0 {
				continue
			}
			for a := hhead[h]; a >= 0; a = hnext[a] {
				if state[a] != isVar || nv[a] == 0 {
					continue
				}
				la := iw[pe[a] : pe[a]+ln[a]]
				for _, x := range la {
					w[x] = wflg
				}
				prevB := a
				for b := hnext[a]; b >= 0; b = hnext[b] {
					if state[b] != isVar || nv[b] == 0 {
						continue
					}
					same := ln[b] == ln[a] && elen[b] == elen[a]
					if same {
						for _, x := range iw[pe[b] : pe[b]+ln[b]] {
							if w[x] != wflg {
								same = false
								break
							}
						}
					}
					if !same {
						prevB = b
						continue
					}
					// Merge b into a.
					nv[a] += nv[b] // both negative
					nv[b] = 0
					state[b] = isDead
					if mfirst[a] < 0 {
						mfirst[a] = b
					} else {
						mnext[mlast[a]] = b
					}
					if mfirst[b] >= 0 {
						mnext[b] = mfirst[b]
						mlast[a] = mlast[b]
					} else {
						mlast[a] = b
					}
					hnext[prevB] = hnext[b]
				}
				wflg++
			}
			hhead[h] = -1
		}

		// Finish: restore signs, bound degrees, reinsert; store Lp as
		// element me.
		nleft := total - nel
		k := 0
		degme = 0
		for _, i := range lp {
			if state[i] != isVar || nv[i] == 0 {
				continue
			}
			nv[i] = -nv[i]
			deg[i] = max(1, min(deg[i], nleft-nv[i]))
			insert(i)
			mindeg = min(mindeg, deg[i])
			degme += nv[i]
			lp[k] = i
			k++
		}
		lp = lp[:k]
		if len(iw)+k > cap(iw) {
			compact(k)
		}
		pe[me] = len(iw)
		iw = append(iw, lp...)
		ln[me] = k
		dege[me] = degme
		if k == 0 {
			state[me] = isDead
		}
		wflg += total + 1
	}
	for i := 0; i < n; i++ {
		if isDense[i] {
			perm = append(perm, i)
		}
	}
	return perm
}

// orderAMD orders a for LU. Variables whose diagonal is absent or zero (the
// multiplier rows of a saddle-point system) are first matched greedily with
// a neighbour j of nonzero diagonal and largest |a_ji| in their column, and
// each pair is ordered as one node of a compressed graph, partner first.
// The pair then lands in one front where j's pivot turns the zero diagonal
// into a nonzero Schur complement, instead of the zero pivot being delayed
// up the tree (compressed-graph ordering: Duff & Pralet 2005, SIAM J.
// Matrix Anal. Appl. 27, "Strategies for scaling and pivoting for sparse
// symmetric indefinite problems").
func orderAMD(a *CSR, ptr, adj []int) []int {
	n := a.Rows
	zero := make([]bool, n)
	for i := 0; i < n; i++ {
		p := a.Pos(i, i)
		zero[i] = p < 0 || a.Val[p] == 0
	}
	colPtr, rowOf, valOf := cscIndex(a)
	mate := make([]int, n)
	for i := range mate {
		mate[i] = -1
	}
	pairs := 0
	for i := 0; i < n; i++ {
		if !zero[i] {
			continue
		}
		best, bv := -1, 0.0
		for p := colPtr[i]; p < colPtr[i+1]; p++ {
			j := rowOf[p]
			if j == i || zero[j] || mate[j] >= 0 {
				continue
			}
			if v := math.Abs(a.Val[valOf[p]]); v > bv {
				best, bv = j, v
			}
		}
		if best >= 0 {
			mate[i], mate[best] = best, i
			pairs++
		}
	}
	if pairs == 0 {
		return amd(n, ptr, adj, nil)
	}
	// Compressed graph: node of each variable, members of each node.
	node := make([]int, n)
	var members [][2]int
	for v := 0; v < n; v++ {
		switch {
		case mate[v] < 0:
			node[v] = len(members)
			members = append(members, [2]int{v, -1})
		case !zero[v]: // the partner (nonzero diagonal) is eliminated first
			node[v] = len(members)
			node[mate[v]] = len(members)
			members = append(members, [2]int{v, mate[v]})
		}
	}
	nn := len(members)
	weight := make([]int, nn)
	cptr := make([]int, nn+1)
	var cadj []int
	mark := make([]int, nn)
	for i := range mark {
		mark[i] = -1
	}
	for c, mem := range members {
		mark[c] = c
		weight[c] = 1
		if mem[1] >= 0 {
			weight[c] = 2
		}
		for _, v := range mem {
			if v < 0 {
				continue
			}
			for _, u := range adj[ptr[v]:ptr[v+1]] {
				if d := node[u]; mark[d] != c {
					mark[d] = c
					cadj = append(cadj, d)
				}
			}
		}
		cptr[c+1] = len(cadj)
	}
	cperm := amd(nn, cptr, cadj, weight)
	perm := make([]int, 0, n)
	for _, c := range cperm {
		perm = append(perm, members[c][0])
		if members[c][1] >= 0 {
			perm = append(perm, members[c][1])
		}
	}
	return perm
}
