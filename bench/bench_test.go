package bench

import (
	"testing"
	"time"

	"github.com/ejecta-dev/ejecta/feedback"
)

// BenchmarkSchemes times each scheme (Couple then Apply, 256 stars on the
// quick suite's glass, 64 neighbors) and, in the same loop, the touch-only
// floor on the same gas, reporting ns per star for both and their ratio
// (touch-ratio: scheme time over floor time).
func BenchmarkSchemes(b *testing.B) {
	suite := QuickSuite()
	c, err := speedCaseFor(suite)
	if err != nil {
		b.Fatal(err)
	}
	tree := newTestTree(b, c)
	sources := supernovae(c)
	k := suite.Neighbors
	for _, s := range Schemes() {
		b.Run(s.Name, func(b *testing.B) {
			work := c.Gas.Clone()
			gas := work.View()
			cp, err := newCoupler(s, c, k, 1)
			if err != nil {
				b.Fatal(err)
			}
			sources, err := newDrives().sources(s, sources, c.Units)
			if err != nil {
				b.Fatal(err)
			}
			var floor TouchFloor
			var out feedback.Output
			var touched []feedback.Touched
			var applier feedback.Applier
			var tFloor, tScheme time.Duration
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				t0 := time.Now()
				if _, err := floor.Touch(gas, tree, c.Stars, k); err != nil {
					b.Fatal(err)
				}
				t1 := time.Now()
				if err := cp.Couple(gas, tree, sources, &out); err != nil {
					b.Fatal(err)
				}
				if touched, _, err = applier.Apply(gas, out.Records, touched); err != nil {
					b.Fatal(err)
				}
				tFloor += t1.Sub(t0)
				tScheme += time.Since(t1)
			}
			n := float64(b.N * len(c.Stars))
			b.ReportMetric(float64(tScheme.Nanoseconds())/n, "ns/star")
			b.ReportMetric(float64(tFloor.Nanoseconds())/n, "floor-ns/star")
			b.ReportMetric(float64(tScheme)/float64(tFloor), "touch-ratio")
		})
	}
}

// BenchmarkTouchFloor times the touch-only floor alone.
func BenchmarkTouchFloor(b *testing.B) {
	suite := QuickSuite()
	c, err := speedCaseFor(suite)
	if err != nil {
		b.Fatal(err)
	}
	tree := newTestTree(b, c)
	gas := c.Gas.View()
	var floor TouchFloor
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := floor.Touch(gas, tree, c.Stars, suite.Neighbors); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(c.Stars)), "ns/star")
}

// BenchmarkQuickSuite runs the quick suite's comparison (all set-ups,
// densities and resolutions, no timing pass) once per iteration.
func BenchmarkQuickSuite(b *testing.B) {
	s := QuickSuite()
	s.Speed.Stars = 0
	s.Outcome = OutcomeSpec{}
	for i := 0; i < b.N; i++ {
		if _, err := Run(s, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
