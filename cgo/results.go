package main

import (
	"math"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
)

// recordABI mirrors ejecta_record.
type recordABI struct {
	GasIndex            int64
	GasID               int64
	StarID              int64
	Channel             int32
	Flags               uint32
	Mass                float64
	SpeciesMass         [numSpecies]float64
	Momentum            [3]float64
	Energy              float64
	Heat                float64
	Radiated            float64
	HoldCoolingUntil    float64
	Kick                float64
	Heating             float64
	HydroDecoupledUntil float64
	FUVField            float64
}

// quantitiesABI mirrors ejecta_quantities.
type quantitiesABI struct {
	Mass        float64
	SpeciesMass [numSpecies]float64
	Momentum    [3]float64
	Energy      float64
}

// ledgerABI mirrors ejecta_ledger.
type ledgerABI struct {
	Released            quantitiesABI
	Deposited           quantitiesABI
	Undeposited         quantitiesABI
	Radiated            float64
	Stars               int64
	Skipped             int64
	Capped              int64
	Limited             int64
	MaxIsotropyResidual float64
	SumIsotropyResidual float64
	RadialMomentum      float64
	MomentumScale       float64
	EnergyScale         float64
	KickEnergy          float64
	Heat                float64
}

func recordToABI(r *feedback.Record, d *recordABI) {
	*d = recordABI{
		GasIndex: int64(r.GasIndex), GasID: r.GasID, StarID: r.StarID,
		Channel: int32(r.Channel), Flags: uint32(r.Flags),
		Mass: r.Mass, SpeciesMass: r.Species, Momentum: r.Momentum, Energy: r.Energy, Heat: r.Heat,
		Radiated: r.Radiated, HoldCoolingUntil: r.HoldCoolingUntil, Kick: r.Kick, Heating: r.Heating,
		HydroDecoupledUntil: r.HydroDecoupledUntil, FUVField: r.FUVField,
	}
}

func recordFromABI(d *recordABI) feedback.Record {
	return feedback.Record{
		GasIndex: int(d.GasIndex), GasID: d.GasID, StarID: d.StarID, Channel: yields.Channel(d.Channel),
		Deposit: feedback.Deposit{
			Mass: d.Mass, Species: d.SpeciesMass, Momentum: d.Momentum, Energy: d.Energy, Heat: d.Heat,
			Radiated: d.Radiated, Flags: feedback.Flags(d.Flags), HoldCoolingUntil: d.HoldCoolingUntil,
			HydroDecoupledUntil: d.HydroDecoupledUntil, FUVField: d.FUVField,
		},
		Kick: d.Kick, Heating: d.Heating,
	}
}

func quantitiesToABI(q *feedback.Quantities) quantitiesABI {
	return quantitiesABI{Mass: q.Mass, SpeciesMass: q.Species, Momentum: q.Momentum, Energy: q.Energy}
}

func quantitiesFromABI(q *quantitiesABI) feedback.Quantities {
	return feedback.Quantities{Mass: q.Mass, Species: q.SpeciesMass, Momentum: q.Momentum, Energy: q.Energy}
}

func ledgerToABI(l *feedback.Ledger) ledgerABI {
	return ledgerABI{
		Released: quantitiesToABI(&l.In), Deposited: quantitiesToABI(&l.Deposited),
		Undeposited: quantitiesToABI(&l.Undeposited), Radiated: l.Radiated,
		Stars: int64(l.Stars), Skipped: int64(l.Skipped), Capped: int64(l.Capped), Limited: int64(l.Limited),
		MaxIsotropyResidual: l.MaxIsotropyResidual, SumIsotropyResidual: l.SumIsotropyResidual,
		RadialMomentum: l.RadialMomentum, MomentumScale: l.MomentumScale, EnergyScale: l.EnergyScale,
		KickEnergy: l.KickEnergy, Heat: l.Heat,
	}
}

func ledgerFromABI(l *ledgerABI) feedback.Ledger {
	return feedback.Ledger{
		In: quantitiesFromABI(&l.Released), Deposited: quantitiesFromABI(&l.Deposited),
		Undeposited: quantitiesFromABI(&l.Undeposited), Radiated: l.Radiated,
		Stars: int(l.Stars), Skipped: int(l.Skipped), Capped: int(l.Capped), Limited: int(l.Limited),
		MaxIsotropyResidual: l.MaxIsotropyResidual, SumIsotropyResidual: l.SumIsotropyResidual,
		RadialMomentum: l.RadialMomentum, MomentumScale: l.MomentumScale, EnergyScale: l.EnergyScale,
		KickEnergy: l.KickEnergy, Heat: l.Heat,
	}
}

// copyOut is every ejecta_copy_* call's handling of the caller's buffer,
// the one rule ejecta.h states for them: dst has room for capacity
// entries, of the n there are; the first min(n, capacity) are filled with
// fill; *written always receives n, the number there are; and when
// n > capacity the call fails with codeBufferTooSmall after copying what
// fits. Capacity 0 with a NULL buffer asks for the count.
func copyOut[T any](dst *T, capacity int64, written *int64, name, what string, n int, fill func(k int, d *T)) error {
	if written == nil {
		return fail(codeNullPointer, "written is NULL")
	}
	*written = 0
	if capacity < 0 {
		return fail(codeInvalidArgument, "capacity %d must be >= 0", capacity)
	}
	if dst == nil && capacity > 0 {
		return fail(codeNullPointer, "%s is NULL with capacity %d", name, capacity)
	}
	k := min(int64(n), capacity)
	if k > 0 {
		d := unsafe.Slice(dst, k)
		for i := range d {
			fill(i, &d[i])
		}
	}
	*written = int64(n)
	if k < int64(n) {
		return fail(codeBufferTooSmall, "%d %s, buffer holds %d (the first %d copied)", n, what, capacity, k)
	}
	return nil
}

// entryRecordCount is behind ejecta_record_count.
func entryRecordCount(h uint64, count *int64) int32 {
	return withSession(h, func(s *session) error {
		if count == nil {
			return fail(codeNullPointer, "count is NULL")
		}
		*count = int64(len(s.out.Records))
		return nil
	})
}

// entryCopyRecords is behind ejecta_copy_records.
func entryCopyRecords(h uint64, dst *recordABI, capacity int64, written *int64) int32 {
	return withSession(h, func(s *session) error {
		return copyOut(dst, capacity, written, "records", "records", len(s.out.Records), func(k int, d *recordABI) {
			recordToABI(&s.out.Records[k], d)
		})
	})
}

// entryCopyUndeposited is behind ejecta_copy_undeposited.
func entryCopyUndeposited(h uint64, ids *int64, channels *int32, capacity int64, written *int64) int32 {
	return withSession(h, func(s *session) error {
		probs := s.out.Problems
		var chans []int32
		if channels != nil && capacity > 0 {
			chans = unsafe.Slice(channels, min(int64(len(probs)), capacity))
		}
		return copyOut(ids, capacity, written, "star_ids", "undeposited releases", len(probs), func(k int, d *int64) {
			*d = probs[k].StarID
			if chans != nil {
				chans[k] = int32(probs[k].Channel)
			}
		})
	})
}

// entryGetLedger is behind ejecta_get_ledger.
func entryGetLedger(h uint64, dst *ledgerABI) int32 {
	return withSession(h, func(s *session) error {
		if dst == nil {
			return fail(codeNullPointer, "ledger is NULL")
		}
		*dst = ledgerToABI(&s.out.Ledger)
		return nil
	})
}

// entryLedgerBalanced is behind ejecta_ledger_balanced.
func entryLedgerBalanced(l *ledgerABI, rel float64, msg *byte, capacity int64) int32 {
	err := guard(func() error {
		if l == nil {
			return fail(codeNullPointer, "ledger is NULL")
		}
		if !(rel >= 0) || math.IsInf(rel, 0) {
			return fail(codeInvalidArgument, "relative tolerance %g must be finite and >= 0", rel)
		}
		g := ledgerFromABI(l)
		if err := g.Balanced(rel); err != nil {
			return failWith(codeImbalance, err, "ledger")
		}
		return nil
	})
	if err != nil {
		putText(msg, capacity, err.Error())
	} else {
		putText(msg, capacity, "")
	}
	return codeOf(err)
}
