package remnant

import (
	"testing"
)

// BenchmarkZoneUpdates steps a remnant at n_H = 1 through its first
// thousand steps at the default resolution and reports zone updates per
// second; the hydro-only variant (cooling off) is the baseline the cooling
// cost is measured against.
func BenchmarkZoneUpdates(b *testing.B) {
	for _, tc := range []struct {
		name      string
		noCooling bool
	}{{"hydro-only", true}, {"with-cooling", false}} {
		b.Run(tc.name, func(b *testing.B) {
			cfg := DefaultConfig()
			cfg.NoCooling = tc.noCooling
			var zones int
			for b.Loop() {
				s, err := New(cfg)
				if err != nil {
					b.Fatal(err)
				}
				for range 1000 {
					if err := s.Step(); err != nil {
						b.Fatal(err)
					}
				}
				zones += 1000 * s.Zones()
			}
			b.ReportMetric(float64(zones)/b.Elapsed().Seconds(), "zone-updates/s")
		})
	}
}
