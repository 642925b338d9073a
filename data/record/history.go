package record

import "container/heap"

// SortHistory orders one entity's events for display: every event comes
// after each event of the list that it supersedes, and among the events
// whose predecessors are all placed, the earliest in view order (clock,
// device id, event id) comes first (Kahn's topological sort with a
// priority queue). Clocks alone can put an edit before what it replaced
// when the author's clock was behind, or when the stamp it observed was
// capped at MaxClockAhead; supersession is what the author saw. With no
// supersession between them, events keep clock order. Supersedes
// entries naming events outside the list are ignored; a cycle (which
// content-addressed ids cannot form) falls back to clock order for the
// events left. The result depends only on the set of events.
func SortHistory(evs []Stamped) {
	n := len(evs)
	if n < 2 {
		return
	}
	SortStamped(evs)
	index := make(map[EventID]int, n)
	for i, e := range evs {
		index[e.ID] = i
	}
	waiting := make([]int, n) // predecessors of i not yet placed
	after := make([][]int, n) // events that supersede i
	for i, e := range evs {
		seen := map[int]bool{}
		for _, s := range e.Supersedes {
			if j, ok := index[s]; ok && j != i && !seen[j] {
				seen[j] = true
				waiting[i]++
				after[j] = append(after[j], i)
			}
		}
	}
	ready := &intHeap{}
	for i := range evs {
		if waiting[i] == 0 {
			heap.Push(ready, i)
		}
	}
	order := make([]int, 0, n)
	placed := make([]bool, n)
	for len(order) < n {
		if ready.Len() == 0 { // a cycle: place the earliest event left
			for i := range evs {
				if !placed[i] {
					heap.Push(ready, i)
					waiting[i] = 0
					break
				}
			}
		}
		i := heap.Pop(ready).(int)
		if placed[i] {
			continue
		}
		placed[i] = true
		order = append(order, i)
		for _, k := range after[i] {
			if waiting[k]--; waiting[k] == 0 && !placed[k] {
				heap.Push(ready, k)
			}
		}
	}
	out := make([]Stamped, n)
	for k, i := range order {
		out[k] = evs[i]
	}
	copy(evs, out)
}

// intHeap is a min-heap of indices into a slice already in view order,
// so the smallest index is the earliest event.
type intHeap []int

func (h intHeap) Len() int           { return len(h) }
func (h intHeap) Less(i, j int) bool { return h[i] < h[j] }
func (h intHeap) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *intHeap) Push(x any)        { *h = append(*h, x.(int)) }
func (h *intHeap) Pop() any {
	old := *h
	x := old[len(old)-1]
	*h = old[:len(old)-1]
	return x
}
