package feedbacktest_test

import (
	"testing"

	"github.com/stretchr/testify/assert"

	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
)

func TestNearest(t *testing.T) {
	g := &audit.GasArrays{Mass: []float64{1, 1, 1, 1}}
	g.Pos[0] = []float64{0, 2, -1, 1}
	g.Pos[1] = []float64{0, 0, 0, 0}
	g.Pos[2] = []float64{0, 0, 0, 0}
	tests := []struct {
		pos  [3]float64
		want int
	}{
		{[3]float64{0.1, 0, 0}, 0},
		{[3]float64{1.9, 0.5, 0}, 1},
		{[3]float64{-5, 0, 0}, 2},
		{[3]float64{0.5, 0, 0}, 0}, // as near to 0 as to 3: the first
		{[3]float64{0.6, 0, 0}, 3},
	}
	for _, tc := range tests {
		assert.Equal(t, tc.want, feedbacktest.Nearest(g, tc.pos), "%v", tc.pos)
	}
}
