package hydro

import "testing"

// BenchmarkPencil times the fluxes of a 1024-cell row with a shock in it;
// the first-order variant (no reconstruction) is the same-run baseline that
// isolates the cost of the limited reconstruction.
func BenchmarkPencil(b *testing.B) {
	g := Monatomic()
	n := 1024
	w := make([]Prim, n+4)
	for i := range w {
		w[i] = Prim{Rho: 1 + 0.1*float64(i%7), Vx: 0.3, P: 1 + 0.05*float64(i%5)}
		if i > n/2 {
			w[i].Rho, w[i].P = 0.125, 0.1
		}
	}
	flux := make([]Cons, n+1)
	for _, lim := range []Limiter{FirstOrder, MonotonizedCentral} {
		b.Run(lim.String(), func(b *testing.B) {
			for b.Loop() {
				g.PencilFluxes(lim, w, flux)
			}
			b.ReportMetric(float64(b.N*(n+1))/b.Elapsed().Seconds(), "faces/s")
		})
	}
}
