package main

import (
	"math"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
)

// Ways ejecta_apply_records finds a record's element (EJECTA_LOCATE_*).
const (
	locateByIndex int32 = 0
	locateByID    int32 = 1
)

// applyReportABI mirrors ejecta_apply_report.
type applyReportABI struct {
	Records           int64
	Elements          int64
	Deposited         quantitiesABI
	Reclaimed         float64
	Shortfall         float64
	ShortfallElements int64
}

// touchedABI mirrors ejecta_touched.
type touchedABI struct {
	GasIndex            int64
	GasID               int64
	MaxKick             float64
	MaxHeating          float64
	HoldCoolingUntil    float64
	HydroDecoupledUntil float64
	FUVField            float64
	Flags               uint32
	Reserved            int32
}

// apply applies located records to the bound gas, keeping the timestep
// help of the touched elements.
func (s *session) apply(recs []feedback.Record, report *applyReportABI) error {
	touched, rep, err := s.applier.Apply(&s.gas.gas, recs, s.touched)
	s.touched = touched
	if err != nil {
		return failWith(codeBadValue, err, "apply")
	}
	if report != nil {
		*report = applyReportABI{
			Records: int64(rep.Records), Elements: int64(rep.Elements),
			Deposited: quantitiesToABI(&rep.Deposited),
			Reclaimed: rep.Reclaimed, Shortfall: rep.Shortfall, ShortfallElements: int64(rep.ShortfallElements),
		}
	}
	return nil
}

// applyStep is behind ejecta_apply_step_records.
func (s *session) applyStep(report *applyReportABI) error {
	switch s.phase {
	case phaseUnbound:
		return fail(codeNoGas, "no gas bound")
	case phaseBound:
		return fail(codeInvalidArgument, "no step has run on the bound gas")
	case phaseApplied:
		return fail(codeAlreadyApplied, "the records of the last step were already applied")
	}
	if err := s.gas.checkLocated(s.out.Records); err != nil {
		return err
	}
	if err := s.apply(s.out.Records, report); err != nil {
		return err
	}
	s.phase = phaseApplied
	return nil
}

// applyRecords is behind ejecta_apply_records.
func (s *session) applyRecords(recs *recordABI, n int64, locate int32, report *applyReportABI) error {
	if n < 0 || n > math.MaxInt32*64 {
		return fail(codeInvalidArgument, "n_records %d must be >= 0", n)
	}
	if recs == nil && n > 0 {
		return fail(codeNullPointer, "records is NULL with n_records %d", n)
	}
	if locate != locateByIndex && locate != locateByID {
		return fail(codeInvalidArgument, "locate %d: want %d (by index) or %d (by ID)", locate, locateByIndex, locateByID)
	}
	if err := s.requireGas(); err != nil {
		return err
	}
	s.incoming = s.incoming[:0]
	if n > 0 {
		for _, r := range unsafe.Slice(recs, n) {
			s.incoming = append(s.incoming, recordFromABI(&r))
		}
	}
	if locate == locateByID {
		index, err := s.gas.idIndex()
		if err != nil {
			return err
		}
		if err := index.Resolve(s.incoming); err != nil {
			return failWith(codeUnknownGas, err, "apply")
		}
	} else if err := s.gas.checkLocated(s.incoming); err != nil {
		return err
	}
	return s.apply(s.incoming, report)
}

// entryApplyStepRecords is behind ejecta_apply_step_records.
func entryApplyStepRecords(h uint64, report *applyReportABI) int32 {
	return withSession(h, func(s *session) error { return s.applyStep(report) })
}

// entryApplyRecords is behind ejecta_apply_records.
func entryApplyRecords(h uint64, recs *recordABI, n int64, locate int32, report *applyReportABI) int32 {
	return withSession(h, func(s *session) error { return s.applyRecords(recs, n, locate, report) })
}

// entryCopyTouched is behind ejecta_copy_touched.
func entryCopyTouched(h uint64, dst *touchedABI, capacity int64, written *int64) int32 {
	return withSession(h, func(s *session) error {
		return copyOut(dst, capacity, written, "touched", "touched elements", len(s.touched), func(k int, d *touchedABI) {
			t := &s.touched[k]
			*d = touchedABI{GasIndex: int64(t.Index), GasID: t.ID, MaxKick: t.MaxKick, MaxHeating: t.MaxHeating,
				HoldCoolingUntil: t.HoldCoolingUntil, HydroDecoupledUntil: t.HydroDecoupledUntil, FUVField: t.FUVField,
				Flags: uint32(t.Flags)}
		})
	})
}
