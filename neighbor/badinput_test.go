package neighbor

import (
	"math"
	"testing"

	"github.com/stretchr/testify/require"
)

type builder struct {
	name  string
	build func(pos []float64, ids []int64, box Box) (Finder, error)
}

func builders() []builder {
	return []builder{
		{"tree", func(p []float64, i []int64, b Box) (Finder, error) { return NewTree(p, i, b) }},
		{"host", func(p []float64, i []int64, b Box) (Finder, error) {
			all := make([]int, len(i))
			for j := range all {
				all[j] = j
			}
			return NewHostLists(p, i, b, []int{0, len(all)}, all)
		}},
	}
}

func TestBuildRejectsBadGas(t *testing.T) {
	good := []float64{0, 0, 0, 0.5, 0.5, 0.5, 0.9, 0.1, 0.3}
	ids := []int64{7, 8, 9}
	with := func(i int, v float64) []float64 {
		p := append([]float64(nil), good...)
		p[i] = v
		return p
	}
	cases := []struct {
		name string
		pos  []float64
		ids  []int64
		box  Box
	}{
		{"empty gas", nil, nil, Box{}},
		{"NaN position", with(4, math.NaN()), ids, Box{}},
		{"+Inf position", with(0, math.Inf(1)), ids, Box{}},
		{"-Inf position in periodic box", with(8, math.Inf(-1)), ids, Box{Size: [3]float64{1, 1, 1}}},
		{"fewer IDs than positions", good, ids[:2], Box{}},
		{"more IDs than positions", good, []int64{1, 2, 3, 4}, Box{}},
		{"positions not a multiple of 3", good[:8], ids, Box{}},
		{"duplicate IDs", good, []int64{7, 8, 7}, Box{}},
		{"duplicate IDs far apart", good, []int64{math.MinInt64, math.MaxInt64, math.MinInt64}, Box{}},
		{"negative box size", good, ids, Box{Size: [3]float64{1, -1, 1}}},
		{"NaN box size", good, ids, Box{Size: [3]float64{math.NaN(), 1, 1}}},
		{"infinite box size", good, ids, Box{Size: [3]float64{1, 1, math.Inf(1)}}},
	}
	for _, b := range builders() {
		for _, c := range cases {
			t.Run(b.name+"/"+c.name, func(t *testing.T) {
				f, err := b.build(c.pos, c.ids, c.box)
				require.ErrorIs(t, err, ErrInvalid)
				require.Nil(t, f)
			})
		}
	}
	// Far-apart unique IDs take the sorted-copy path and are accepted.
	_, err := NewTree(good, []int64{math.MinInt64, 0, math.MaxInt64}, Box{})
	require.NoError(t, err)
}

func TestQueriesRejectBadInput(t *testing.T) {
	pos := []float64{0, 0, 0, 0.5, 0.5, 0.5, 0.9, 0.1, 0.3}
	ids := []int64{7, 8, 9}
	ok := Query{Pos: [3]float64{0.2, 0.2, 0.2}}
	cases := []struct {
		name string
		run  func(f Finder) ([]Neighbor, error)
		want error
	}{
		{"k = 0", func(f Finder) ([]Neighbor, error) { return f.Nearest(ok, 0, nil) }, ErrInvalid},
		{"k < 0", func(f Finder) ([]Neighbor, error) { return f.Nearest(ok, -3, nil) }, ErrInvalid},
		{"k > n", func(f Finder) ([]Neighbor, error) { return f.Nearest(ok, 4, nil) }, ErrTooFew},
		{"NaN query (nearest)", func(f Finder) ([]Neighbor, error) {
			return f.Nearest(Query{Pos: [3]float64{0, math.NaN(), 0}}, 1, nil)
		}, ErrInvalid},
		{"Inf query (within)", func(f Finder) ([]Neighbor, error) {
			return f.Within(Query{Pos: [3]float64{0, 0, math.Inf(-1)}}, 1, nil)
		}, ErrInvalid},
		{"negative radius", func(f Finder) ([]Neighbor, error) { return f.Within(ok, -1e-300, nil) }, ErrInvalid},
		{"NaN radius", func(f Finder) ([]Neighbor, error) { return f.Within(ok, math.NaN(), nil) }, ErrInvalid},
		{"star out of range", func(f Finder) ([]Neighbor, error) {
			return f.Nearest(Query{Pos: ok.Pos, Star: 1}, 1, nil)
		}, ErrInvalid},
	}
	for _, box := range []Box{{}, {Size: [3]float64{1, 1, 1}}} {
		for _, b := range builders() {
			f, err := b.build(pos, ids, box)
			require.NoError(t, err)
			for _, c := range cases {
				if c.name == "star out of range" && b.name != "host" {
					continue // spatial finders ignore Star
				}
				t.Run(b.name+"/"+c.name, func(t *testing.T) {
					got, err := c.run(f)
					require.ErrorIs(t, err, c.want)
					require.Empty(t, got)
				})
			}
			// r = 0 and infinite r are valid.
			nb, err := f.Within(Query{Pos: [3]float64{0.5, 0.5, 0.5}}, 0, nil)
			require.NoError(t, err)
			require.Equal(t, []Neighbor{{1, 0}}, nb)
			nb, err = f.Within(ok, math.Inf(1), nil)
			require.NoError(t, err)
			require.Len(t, nb, 3)
		}
	}
}

func TestHostListsRejectBadRows(t *testing.T) {
	pos := []float64{0, 0, 0, 0.5, 0.5, 0.5, 0.9, 0.1, 0.3}
	ids := []int64{7, 8, 9}
	cases := []struct {
		name             string
		offsets, indices []int
	}{
		{"no offsets", nil, nil},
		{"first offset not 0", []int{1, 2}, []int{0, 1}},
		{"last offset short of indices", []int{0, 1}, []int{0, 1}},
		{"last offset past indices", []int{0, 3}, []int{0, 1}},
		{"offsets decrease", []int{0, 2, 1, 3}, []int{0, 1, 2}},
		{"index negative", []int{0, 2}, []int{0, -1}},
		{"index = n", []int{0, 2}, []int{0, 3}},
		{"index repeated in a row", []int{0, 3}, []int{2, 0, 2}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h, err := NewHostLists(pos, ids, Box{}, c.offsets, c.indices)
			require.ErrorIs(t, err, ErrInvalid)
			require.Nil(t, h)
		})
	}
	// The same element in different rows, empty rows: fine.
	h, err := NewHostLists(pos, ids, Box{}, []int{0, 2, 2, 4}, []int{0, 2, 2, 1})
	require.NoError(t, err)
	_, err = h.Nearest(Query{Star: 1}, 1, nil)
	require.ErrorIs(t, err, ErrTooFew, "empty row")
	nb, err := h.Nearest(Query{Star: 2}, 2, nil)
	require.NoError(t, err)
	require.Equal(t, []int{1, 2}, []int{nb[0].Index, nb[1].Index})
	_, err = h.Nearest(Query{Star: 2}, 3, nil)
	require.ErrorIs(t, err, ErrTooFew, "row shorter than k")
}
