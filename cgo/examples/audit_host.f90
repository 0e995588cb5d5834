! audit_host.f90 — a Fortran host that injects supernova feedback with its
! own code (no ejecta step) and writes the step for the conservation audit
! through ejecta_mod's dump calls, from the column descriptors it would
! bind its gas with.
!
! The gas is a lattice of cells in a periodic box (real(c_double) fields
! and integer(c_int64_t) IDs, tracking all metals and iron in the default
! species set). Two moving stars, one next to a face of the box so that
! its reach wraps around, each give every cell within reach an equal share
! of their ejecta (moving with the star), metals and iron, and their
! energy as heat, less a fifth booked as radiated. The scheme conserves:
! the audit passes it.
!
! Usage: audit_host DIR [lose-mass]. With lose-mass one cell near the
! first star ends the step with nine tenths of the mass it had before, and
! the host prints its ID as planted_id=. Prints key=value lines and
! "result pass". Code units: pc, Msun, km/s.
program ejecta_fortran_audit_host
  use, intrinsic :: iso_c_binding
  use ejecta_mod
  implicit none

  type, bind(c) :: cell
     real(c_double) :: pos(3), vel(3)
     real(c_double) :: mass, u, metals, iron
     integer(c_int64_t) :: id
  end type cell

  type, bind(c) :: source
     integer(c_int64_t) :: id
     real(c_double) :: pos(3), vel(3)
     real(c_double) :: radius, ejecta_mass, energy, radiated, metals, iron
  end type source

  integer, parameter :: side = 6, n_cells = side**3, n_stars = 2
  real(c_double), parameter :: box = 6.0d0
  type(cell), allocatable, target :: g(:)
  type(source), target :: stars(n_stars)
  type(ejecta_gas) :: gas
  type(ejecta_star_columns) :: cols
  integer(c_int32_t), target :: gas_species(2), star_species(2)
  type(ejecta_field), target :: fractions(2), masses(2)
  integer(c_int64_t) :: dump
  integer(c_size_t) :: stride
  character(len=512) :: msg, dir, mode
  real(c_double) :: foe
  integer :: i, ix, iy, iz, a, s, fails, planted
  integer(c_int) :: rc
  logical :: plant

  fails = 0
  if (command_argument_count() < 1) then
     print *, 'usage: audit_host DIR [lose-mass]'
     stop 2
  end if
  call get_command_argument(1, dir)
  mode = ' '
  if (command_argument_count() > 1) call get_command_argument(2, mode)
  plant = trim(mode) == 'lose-mass'

  allocate(g(n_cells))
  do i = 1, n_cells
     ix = mod(i - 1, side); iy = mod((i - 1) / side, side); iz = (i - 1) / (side * side)
     g(i)%pos = [ix + 0.5d0, iy + 0.5d0, iz + 0.5d0]
     g(i)%vel = [0.3d0 * ix, -0.2d0 * iy, 0.1d0 * iz]
     g(i)%mass = 3.45d0
     g(i)%u = 100.0d0
     g(i)%metals = 0.0134d0
     g(i)%iron = 0.0013d0
     g(i)%id = 40 + 2 * i
  end do
  foe = 1.0d51 / (1.988409870698051d33 * 1.0d10)
  stars(1) = source(5, [0.0d0, 3.0d0, 3.0d0], [10.0d0, 0.0d0, -5.0d0], 1.6d0, 10.0d0, foe, 0.2d0 * foe, 2.0d0, 0.1d0)
  stars(2) = source(6, [3.0d0, 3.0d0, 3.0d0], [0.0d0, 20.0d0, 0.0d0], 1.6d0, 8.0d0, foe, 0.2d0 * foe, 1.5d0, 0.08d0)

  ! The descriptors the host would bind its gas with.
  stride = c_sizeof(g(1))
  gas%count = n_cells
  do a = 1, 3
     gas%position(a) = ejecta_strided(c_loc(g(1)%pos(a)), stride, EJECTA_FLOAT64)
     gas%velocity(a) = ejecta_strided(c_loc(g(1)%vel(a)), stride, EJECTA_FLOAT64)
  end do
  gas%mass = ejecta_strided(c_loc(g(1)%mass), stride, EJECTA_FLOAT64)
  gas%internal_energy = ejecta_strided(c_loc(g(1)%u), stride, EJECTA_FLOAT64)
  gas%id = ejecta_strided(c_loc(g(1)%id), stride, EJECTA_INT64)
  gas_species = [EJECTA_SPECIES_METALS, EJECTA_SPECIES_IRON]
  fractions(1) = ejecta_strided(c_loc(g(1)%metals), stride, EJECTA_FLOAT64)
  fractions(2) = ejecta_strided(c_loc(g(1)%iron), stride, EJECTA_FLOAT64)
  gas%n_species = 2
  gas%species = c_loc(gas_species)
  gas%species_fraction = c_loc(fractions)

  ! ...and the stars' releases, column by column.
  stride = c_sizeof(stars(1))
  cols%count = n_stars
  cols%id = ejecta_strided(c_loc(stars(1)%id), stride, EJECTA_INT64)
  do a = 1, 3
     cols%position(a) = ejecta_strided(c_loc(stars(1)%pos(a)), stride, EJECTA_FLOAT64)
     cols%velocity(a) = ejecta_strided(c_loc(stars(1)%vel(a)), stride, EJECTA_FLOAT64)
  end do
  cols%coupling_radius = ejecta_strided(c_loc(stars(1)%radius), stride, EJECTA_FLOAT64)
  cols%ejecta_mass = ejecta_strided(c_loc(stars(1)%ejecta_mass), stride, EJECTA_FLOAT64)
  cols%energy = ejecta_strided(c_loc(stars(1)%energy), stride, EJECTA_FLOAT64)
  cols%radiated = ejecta_strided(c_loc(stars(1)%radiated), stride, EJECTA_FLOAT64)
  star_species = [EJECTA_SPECIES_METALS, EJECTA_SPECIES_IRON]
  masses(1) = ejecta_strided(c_loc(stars(1)%metals), stride, EJECTA_FLOAT64)
  masses(2) = ejecta_strided(c_loc(stars(1)%iron), stride, EJECTA_FLOAT64)
  cols%n_species = 2
  cols%species = c_loc(star_species)
  cols%species_mass = c_loc(masses)

  ! A species list with an unknown symbol is refused with a message.
  rc = ejecta_dump_open_checked(trim(dir), 'Fe,Unobtainium', [box, box, box], dump, msg)
  if (rc /= EJECTA_ERR_INVALID_ARGUMENT .or. dump /= 0) call fail('unknown element accepted')
  print '(a,a)', 'species_error=', trim(msg)

  rc = ejecta_dump_open_checked(trim(dir), '', [box, box, box], dump, msg)
  if (rc /= EJECTA_OK) then
     print *, 'FAIL open: ', trim(msg)
     stop 2
  end if
  ! Calls out of order are refused and leave the session as it was.
  rc = ejecta_dump_gas_after(dump, gas)
  if (rc /= EJECTA_ERR_INVALID_ARGUMENT) call fail('gas after before gas before accepted')
  print '(a,a)', 'order_error=', ejecta_dump_error_text(dump)

  call must(dump, ejecta_dump_gas_before(dump, gas), 'gas before')
  do s = 1, n_stars
     call inject(stars(s))
  end do
  planted = 0
  if (plant) then
     ! The cell at (0.5, 2.5, 2.5), next to the first star, loses mass.
     do i = 1, n_cells
        if (all(abs(g(i)%pos - [0.5d0, 2.5d0, 2.5d0]) < 1.0d-9)) planted = i
     end do
     g(planted)%mass = 0.9d0 * 3.45d0
     print '(a,i0)', 'planted_id=', g(planted)%id
  end if
  call must(dump, ejecta_dump_gas_after(dump, gas), 'gas after')
  call must(dump, ejecta_dump_stars(dump, cols), 'stars')
  call must(dump, ejecta_dump_finish(dump), 'finish')
  call must(dump, ejecta_dump_close(dump), 'close')
  if (dump /= 0) call fail('close leaves the handle at 0')

  print '(a,a)', 'dump=', trim(dir) // '/manifest.json'
  if (fails == 0) then
     print '(a)', 'result pass'
  else
     print '(a,i0,a)', 'result fail (', fails, ' checks)'
     stop 1
  end if

contains

  ! inject gives every cell within reach of the star (nearest periodic
  ! image) an equal share of its ejecta, moving with the star, and of its
  ! energy less what it radiated as heat, after the kinetic energy the
  ! cells gained by taking up the moving ejecta.
  subroutine inject(st)
    type(source), intent(in) :: st
    integer :: near(n_cells), n, k, j
    real(c_double) :: d(3), w, m0, m1, p(3), q(3), dk, heat
    n = 0
    do j = 1, n_cells
       d = g(j)%pos - st%pos
       d = d - box * anint(d / box)
       if (sum(d * d) <= st%radius**2) then
          n = n + 1
          near(n) = j
       end if
    end do
    if (n == 0) then
       call fail('a star found no gas')
       return
    end if
    w = 1.0d0 / n
    dk = 0
    do k = 1, n
       j = near(k)
       m0 = g(j)%mass
       m1 = m0 + w * st%ejecta_mass
       p = m0 * g(j)%vel
       q = p + w * st%ejecta_mass * st%vel
       dk = dk + sum(q * q) / (2 * m1) - sum(p * p) / (2 * m0)
    end do
    heat = st%energy - st%radiated + 0.5d0 * st%ejecta_mass * sum(st%vel**2) - dk
    if (heat <= 0) call fail('no heat left')
    do k = 1, n
       j = near(k)
       m0 = g(j)%mass
       m1 = m0 + w * st%ejecta_mass
       q = m0 * g(j)%vel + w * st%ejecta_mass * st%vel
       g(j)%metals = (m0 * g(j)%metals + w * st%metals) / m1
       g(j)%iron = (m0 * g(j)%iron + w * st%iron) / m1
       g(j)%u = (m0 * g(j)%u + w * heat) / m1
       g(j)%vel = q / m1
       g(j)%mass = m1
    end do
  end subroutine inject

  subroutine must(handle, code, what)
    integer(c_int64_t), intent(in) :: handle
    integer(c_int), intent(in) :: code
    character(len=*), intent(in) :: what
    if (code /= EJECTA_OK) then
       print '(a,a,a,i0,a,a)', 'FAIL ', what, ': code ', code, ': ', ejecta_dump_error_text(handle)
       stop 2
    end if
  end subroutine must

  subroutine fail(what)
    character(len=*), intent(in) :: what
    print '(a,a)', 'FAIL ', what
    fails = fails + 1
  end subroutine fail

end program ejecta_fortran_audit_host
