package feedback

import (
	"fmt"
	"math"
	"slices"

	"github.com/ejecta-dev/ejecta/yields"
)

// Touched is the timestep help for one gas element that received records:
// the largest speed change and the largest heating per unit mass any single
// record gave it, the union of the records' flags, the latest hold times,
// and the summed far-ultraviolet field (G0) of the stars that lit it, for
// hosts with their own cooling or chemistry.
type Touched struct {
	Index               int
	ID                  int64
	MaxKick             float64
	MaxHeating          float64
	Flags               Flags
	HoldCoolingUntil    float64
	HydroDecoupledUntil float64
	FUVField            float64
}

// ApplyReport summarizes an Apply call.
type ApplyReport struct {
	// Records and Elements count what was applied.
	Records, Elements int
	// Deposited is what the gas gained, recomputed from the records.
	Deposited Quantities
	// Reclaimed is radiated energy taken back into the gas. When the kicks
	// of several stars on one element add up coherently, the element gains
	// more kinetic energy than the sum of what each star's deposit
	// assumed, and its heat would go negative; the energy those stars
	// booked as radiated on the element's behalf pays for the difference
	// first. The step's radiated energy is therefore the couplers'
	// Ledger.Radiated less the Reclaimed of every Apply (summed over ranks).
	Reclaimed float64
	// Shortfall is energy the gas received beyond what the records carried:
	// where coherent kicks of several stars on one element need more kinetic
	// energy than their deposits and the reclaimed radiated energy provide,
	// the element's internal energy is set to zero, not below, and the
	// difference is booked here. Star-local deposits cannot prevent it
	// without giving up decomposition invariance; it is a conservation
	// failure made visible, and the balance of a step reads
	// In + Shortfall = gas gain + (Radiated - Reclaimed) + Undeposited.
	// ShortfallElements counts the elements concerned.
	Shortfall         float64
	ShortfallElements int
}

// Applier adds records to the gas in place (Apply), keeping its ordering
// scratch from call to call, so applying every step allocates nothing once
// the scratch has grown. The zero value is ready to use; one Applier serves
// one call at a time.
type Applier struct {
	keys []applyKey
}

// applyKey is the order Apply sums in, with the record it stands for.
type applyKey struct {
	gas, star int64
	channel   int32
	index     int32
}

// Apply adds records to the gas in place. It orders the records by gas
// ID, star ID and channel (without moving them), then sums each element's
// records in that fixed order, so the result is bitwise the same whatever
// order the records came in (any worker count, any star order, any rank
// count). For each element it sets
//
//	m' = m + sum dm,  v' = (m v + sum dp) / m',  X'_s = (X_s m + sum dm_s) / m',
//	u' = (m u + sum dE - (1/2 m' v'^2 - 1/2 m v^2)) / m',
//
// so the element's total energy grows by exactly the records' energies.
// All records are checked before anything is written: a bad record (index
// outside the gas, ID not matching the element at its index, one gas ID at
// two indices, the same gas, star and channel twice, non-finite values,
// negative mass) fails the call and leaves the gas untouched. touched (may
// be nil) is reused to return the timestep help, one entry per element, in
// gas-ID order.
func (ap *Applier) Apply(gas *Gas, records []Record, touched []Touched) ([]Touched, ApplyReport, error) {
	var rep ApplyReport
	touched = touched[:0]
	if err := gas.Validate(); err != nil {
		return touched, rep, fmt.Errorf("apply: %w", err)
	}
	if len(records) > math.MaxInt32 {
		return touched, rep, errorf(ErrInvalidArgument, "apply: %d records, at most %d per call", len(records), math.MaxInt32)
	}
	keys := ap.keys[:0]
	for i := range records {
		r := &records[i]
		if r.GasIndex < 0 || r.GasIndex >= gas.N {
			return touched, rep, errorf(ErrUnknownGas, "apply: record %d: gas index %d outside the gas (%d elements)", i, r.GasIndex, gas.N)
		}
		if id := gas.ID.Int(r.GasIndex); id != r.GasID {
			return touched, rep, errorf(ErrUnknownGas, "apply: record %d: gas ID %d does not match ID %d at index %d", i, r.GasID, id, r.GasIndex)
		}
		if err := r.check(); err != nil {
			return touched, rep, fmt.Errorf("apply: record %d (gas %d, star %d): %w", i, r.GasID, r.StarID, err)
		}
		keys = append(keys, applyKey{gas: r.GasID, star: r.StarID, channel: int32(r.Channel), index: int32(i)})
	}
	ap.keys = keys
	slices.SortFunc(keys, func(a, b applyKey) int {
		if d := cmpInt64(a.gas, b.gas); d != 0 {
			return d
		}
		if d := cmpInt64(a.star, b.star); d != 0 {
			return d
		}
		return int(a.channel) - int(b.channel)
	})
	for k := 1; k < len(keys); k++ {
		a, b := &keys[k-1], &keys[k]
		if a.gas != b.gas {
			continue
		}
		if records[a.index].GasIndex != records[b.index].GasIndex {
			return touched, rep, errorf(ErrInvalidArgument, "apply: gas ID %d appears at indices %d and %d", a.gas, records[a.index].GasIndex, records[b.index].GasIndex)
		}
		if a.star == b.star && a.channel == b.channel {
			return touched, rep, errorf(ErrInvalidArgument, "apply: two records for gas %d from star %d, channel %d (applied twice?)", a.gas, a.star, a.channel)
		}
	}
	for lo := 0; lo < len(keys); {
		hi := lo + 1
		for hi < len(keys) && keys[hi].gas == keys[lo].gas {
			hi++
		}
		touched = append(touched, applyElement(gas, records, keys[lo:hi], &rep))
		rep.Elements++
		lo = hi
	}
	rep.Records = len(records)
	return touched, rep, nil
}

func (r *Record) check() error {
	vals := [...]float64{r.Mass, r.Momentum[0], r.Momentum[1], r.Momentum[2], r.Energy, r.Heat, r.Radiated, r.Kick, r.Heating,
		r.HoldCoolingUntil, r.HydroDecoupledUntil, r.FUVField}
	for _, v := range vals {
		if !finite(v) {
			return errorf(ErrBadValue, "non-finite value")
		}
	}
	if r.Mass < 0 || r.Radiated < 0 {
		return errorf(ErrBadValue, "negative mass %g or radiated energy %g", r.Mass, r.Radiated)
	}
	if r.FUVField < 0 {
		return errorf(ErrBadValue, "negative far-ultraviolet field %g", r.FUVField)
	}
	for sp, m := range r.Species {
		if !finite(m) || m < 0 || m > r.Mass*(1+1e-12) {
			return errorf(ErrBadValue, "species %d mass %g not within [0, %g]", sp, m, r.Mass)
		}
	}
	return nil
}

// applyElement sums one element's records (keys in order) and writes its
// new state.
func applyElement(gas *Gas, records []Record, keys []applyKey, rep *ApplyReport) Touched {
	i := records[keys[0].index].GasIndex
	t := Touched{Index: i, ID: keys[0].gas}
	m := gas.Mass.At(i)
	v := gas.velocity(i)
	u := gas.InternalEnergy.At(i)
	var dm, de, rad float64
	var dp [3]float64
	var dsp yields.Abundances
	for _, key := range keys {
		r := &records[key.index]
		dm += r.Mass
		for a := 0; a < 3; a++ {
			dp[a] += r.Momentum[a]
		}
		de += r.Energy
		rad += r.Radiated
		for s := range dsp {
			dsp[s] += r.Species[s]
		}
		t.MaxKick = math.Max(t.MaxKick, r.Kick)
		t.MaxHeating = math.Max(t.MaxHeating, r.Heating)
		t.Flags |= r.Flags
		t.HoldCoolingUntil = math.Max(t.HoldCoolingUntil, r.HoldCoolingUntil)
		t.HydroDecoupledUntil = math.Max(t.HydroDecoupledUntil, r.HydroDecoupledUntil)
		t.FUVField += r.FUVField
		rep.Deposited.Mass += r.Mass
		for a := 0; a < 3; a++ {
			rep.Deposited.Momentum[a] += r.Momentum[a]
		}
		rep.Deposited.Energy += r.Energy
		for s := range r.Species {
			rep.Deposited.Species[s] += r.Species[s]
		}
	}
	mt := m + dm
	// Kinetic energy gained, written without the cancellation of
	// 1/2 m' v'^2 - 1/2 m v^2.
	dke := (2*m*dot(v, dp) + dot(dp, dp) - m*dm*dot(v, v)) / (2 * mt)
	thermal := m*u + de - dke
	if thermal < 0 && rad > 0 {
		back := math.Min(-thermal, rad)
		thermal += back
		rep.Reclaimed += back
		rep.Deposited.Energy += back
	}
	if thermal < 0 {
		rep.Shortfall += -thermal
		rep.ShortfallElements++
		rep.Deposited.Energy += -thermal
		thermal = 0
	}
	for a := 0; a < 3; a++ {
		gas.Vel[a].Set(i, (m*v[a]+dp[a])/mt)
	}
	gas.Mass.Set(i, mt)
	gas.InternalEnergy.Set(i, thermal/mt)
	for c, s := range gas.Species {
		col := gas.SpeciesFractions[c]
		x := (col.At(i)*m + dsp[s]) / mt
		col.Set(i, math.Min(math.Max(x, 0), 1))
	}
	return t
}
