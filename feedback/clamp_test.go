package feedback

import (
	"testing"

	"github.com/stretchr/testify/assert"

	"github.com/ejecta-dev/ejecta/yields"
)

// A release is a difference of interpolated cumulative values, so where
// nothing is released it can come out as minus a few ulps: every amount
// the stepper turns into a source is clamped at zero, the far-ultraviolet
// light included, or the photoelectric source would be refused as a
// negative release and its star reported as a problem.
func TestClampRoundOffClampsEveryAmount(t *testing.T) {
	r := yields.Release{RadiantEnergy: -1e-300, IonizingPhotons: -3, FarUltravioletEnergy: -1e-20}
	r.Channels[yields.CoreCollapse].Events = -1e-18
	r.Channels[yields.MassiveWinds].Species[yields.Iron] = -1e-25
	clampRoundOff(&r)
	assert.Zero(t, r.RadiantEnergy)
	assert.Zero(t, r.IonizingPhotons)
	assert.Zero(t, r.FarUltravioletEnergy)
	assert.Zero(t, r.Channels[yields.CoreCollapse].Events)
	assert.Zero(t, r.Channels[yields.MassiveWinds].Species[yields.Iron])
}
