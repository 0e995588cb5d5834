package hydro_test

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/bench/hydro"
)

// The flux through one face between two states, as a 3D solver evaluates a
// y-face: permute so that y is the normal, solve, permute back.
func ExampleIdealGas_HLLC() {
	g := hydro.Monatomic()
	left := hydro.Prim{Rho: 1, Vy: 0.5, P: 1, Scalar: [hydro.NumScalars]float64{1, 0}}
	right := hydro.Prim{Rho: 0.125, P: 0.1}
	f, speed := g.HLLC(left.Permute(hydro.Y), right.Permute(hydro.Y))
	f = f.Unpermute(hydro.Y)
	fmt.Printf("mass flux %.4f, y-momentum flux %.4f, max speed %.4f\n", f.Mass, f.MomY, speed)
	// Output:
	// mass flux 0.7358, y-momentum flux 1.0393, max speed 1.6326
}

// A row of cells with two ghost cells at each end gives the fluxes through
// all its faces in one call.
func ExampleIdealGas_PencilFluxes() {
	g := hydro.Monatomic()
	row := make([]hydro.Prim, 8) // 4 cells and 2+2 ghosts
	for i := range row {
		row[i] = hydro.Prim{Rho: 1, P: 1}
	}
	flux := make([]hydro.Cons, 5)
	g.PencilFluxes(hydro.MonotonizedCentral, row, flux)
	fmt.Println(flux[2])
	// Output:
	// {0 1 0 0 0 [0 0]}
}
