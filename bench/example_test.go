package bench_test

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/bench"
)

// Compare the thermal dump with the terminal-momentum scheme on the
// uniform lattice at n = 1 cm^-3, from well-resolved to coarse gas.
func ExampleRun() {
	suite := bench.QuickSuite()
	suite.Setups, _ = bench.SelectSetups([]string{"uniform-lattice"})
	suite.DensitiesCm3 = []float64{1}
	suite.GasMassesMsun = []float64{1, 1e4}
	suite.Speed.Stars = 0               // no timing here; see BenchmarkSchemes
	suite.Outcome = bench.OutcomeSpec{} // no 3D evolution here; package testbed's ExampleRun shows it
	schemes, _ := bench.SelectSchemes([]string{"thermal-dump", "terminal-momentum"})
	res, err := bench.Run(suite, bench.Options{Schemes: schemes})
	if err != nil {
		panic(err)
	}
	for _, r := range res.Convergence {
		fmt.Printf("%-17s m=%-6g p=%.2g (energy-conserving %.2g, terminal %.3g) Msun km/s\n", r.Scheme, r.GasMassMsun,
			r.RadialMomentumMsunKms, r.EnergyConservingMsunKm, r.TerminalMsunKms)
	}
	for _, r := range res.Isotropy {
		fmt.Printf("%-17s isotropy residual below 1e-9: %v\n", r.Scheme, r.Residual < 1e-9)
	}
	// Output:
	// thermal-dump      m=1      p=0 (energy-conserving 5.3e+04, terminal 2.82e+05) Msun km/s
	// terminal-momentum m=1      p=5.4e+04 (energy-conserving 5.3e+04, terminal 2.82e+05) Msun km/s
	// thermal-dump      m=10000  p=0 (energy-conserving 4.2e+06, terminal 2.82e+05) Msun km/s
	// terminal-momentum m=10000  p=2.8e+05 (energy-conserving 4.2e+06, terminal 2.82e+05) Msun km/s
	// thermal-dump      isotropy residual below 1e-9: true
	// terminal-momentum isotropy residual below 1e-9: true
}
