package feedback

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/neighbor"
)

// sharedSearch finds each star's neighbors once per step and answers every
// channel's coupler from that one search: all channels of a step couple
// the same stars to the same gas. It implements neighbor.Finder for queries
// whose Query.Star is the star's index in the step.
type sharedSearch struct {
	rows [][]neighbor.Neighbor
	errs []error
	pool workerPool
	// finder, stars and cfg are those of the running fill.
	finder neighbor.Finder
	stars  []StarParticle
	cfg    Config
	// wider is the finder of the last fill, kept until release, which
	// answers requests for more neighbors than the search found (a
	// scheme whose reach grows, photoionization).
	wider neighbor.Finder
}

// release forgets the finder of the last fill.
func (s *sharedSearch) release() { s.wider = nil }

// fill runs the search for every star with the coupling configuration's
// neighbor count or radius, on cfg.Workers goroutines. Its error is a
// recovered panic of the finder (ErrInternal); a failed search is kept as
// the star's row error.
func (s *sharedSearch) fill(f neighbor.Finder, stars []StarParticle, cfg Config) error {
	n := len(stars)
	if cap(s.rows) < n {
		rows := make([][]neighbor.Neighbor, n)
		copy(rows, s.rows[:cap(s.rows)])
		s.rows = rows
		s.errs = make([]error, n)
	}
	s.rows, s.errs = s.rows[:n], s.errs[:n]
	s.finder, s.stars, s.cfg = f, stars, cfg
	s.wider = f
	err := s.pool.run(s, cfg.Workers, n)
	s.finder, s.stars = nil, nil
	return err
}

// runItem searches star i's neighbors.
func (s *sharedSearch) runItem(_, i int) {
	q := neighbor.Query{Pos: s.stars[i].Pos, Star: i}
	if s.cfg.Radius > 0 {
		s.rows[i], s.errs[i] = s.finder.Within(q, s.cfg.Radius, s.rows[i])
	} else {
		s.rows[i], s.errs[i] = s.finder.Nearest(q, s.cfg.Neighbors, s.rows[i])
	}
}

func (s *sharedSearch) row(q neighbor.Query) ([]neighbor.Neighbor, error) {
	if q.Star < 0 || q.Star >= len(s.rows) {
		return nil, errorf(ErrInternal, "shared search: star %d outside the step's %d stars", q.Star, len(s.rows))
	}
	return s.rows[q.Star], s.errs[q.Star]
}

// Nearest returns the first k of the star's neighbors; more than the
// search found are asked of the finder itself.
func (s *sharedSearch) Nearest(q neighbor.Query, k int, buf []neighbor.Neighbor) ([]neighbor.Neighbor, error) {
	row, err := s.row(q)
	if err != nil {
		return buf[:0], err
	}
	if k > len(row) {
		if s.wider != nil {
			return s.wider.Nearest(q, k, buf)
		}
		return buf[:0], fmt.Errorf("shared search: %d neighbors asked for, %d found: %w", k, len(row), neighbor.ErrTooFew)
	}
	return append(buf[:0], row[:k]...), nil
}

// Within returns the star's neighbors within r.
func (s *sharedSearch) Within(q neighbor.Query, r float64, buf []neighbor.Neighbor) ([]neighbor.Neighbor, error) {
	row, err := s.row(q)
	if err != nil {
		return buf[:0], err
	}
	if !(r >= 0) {
		return buf[:0], fmt.Errorf("shared search: radius %g: %w", r, neighbor.ErrInvalid)
	}
	buf = buf[:0]
	r2 := r * r
	if math.IsInf(r, 1) {
		r2 = math.Inf(1)
	}
	for _, nb := range row {
		if nb.Dist2 <= r2 {
			buf = append(buf, nb)
		}
	}
	return buf, nil
}
