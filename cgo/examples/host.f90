! host.f90 — a small Fortran host of ejecta through ejecta_mod: gas held as
! an array of a bind(c) derived type with real(c_float) positions and
! real(c_double) everything else, two supernovae, one step. Checks that the
! ledger balances and that the gas changed as the records say; prints
! key=value lines and "result pass", or stops with a non-zero code.
! Code units: pc, Msun, km/s.
program ejecta_fortran_host
  use, intrinsic :: iso_c_binding
  use ejecta_mod
  implicit none

  type, bind(c) :: gas_element
     real(c_float) :: pos(3)
     real(c_double) :: vel(3)
     real(c_double) :: mass, density, energy, metals
     integer(c_int64_t) :: id
  end type gas_element

  integer, parameter :: side = 6, n_gas = side**3, n_stars = 2, k = 32
  real(c_double), parameter :: box = 12.0d0
  type(gas_element), allocatable, target :: gas(:), before(:)
  type(ejecta_config) :: cfg
  type(ejecta_gas) :: desc
  type(ejecta_star) :: stars(n_stars)
  type(ejecta_record), allocatable :: recs(:)
  type(ejecta_ledger) :: led
  type(ejecta_apply_report) :: rep
  integer(c_int32_t), target :: species(1)
  type(ejecta_field), target :: fractions(1)
  integer(c_int64_t) :: ctx, stale, n_rec, written
  integer(c_size_t) :: stride
  character(len=256) :: msg
  character(kind=c_char) :: cmsg(256), version(32)
  integer(c_int32_t) :: abi
  real(c_double) :: h, foe, dm_sum, de_sum, gas_dm, gas_de, ke0, ke1
  real(c_double), allocatable :: dm(:)
  integer :: i, ix, iy, iz, a, s, changed, fails
  integer(c_int) :: rc

  fails = 0
  rc = ejecta_version(version, int(size(version), c_int64_t), abi)
  call must(0_c_int64_t, rc, 'version')
  if (abi /= EJECTA_ABI_VERSION) call fail('ABI version mismatch')

  allocate(gas(n_gas), before(n_gas), dm(n_gas))
  h = box / side
  do i = 1, n_gas
     ix = mod(i - 1, side); iy = mod((i - 1) / side, side); iz = (i - 1) / (side * side)
     gas(i)%pos = real([(ix + 0.5d0) * h, (iy + 0.5d0) * h, (iz + 0.5d0) * h], c_float)
     gas(i)%vel = [0.2d0 * ix, -0.1d0 * iy, 0.0d0]
     gas(i)%density = 0.0345d0
     gas(i)%mass = gas(i)%density * h**3
     gas(i)%energy = 100.0d0
     gas(i)%metals = 0.0134d0
     gas(i)%id = 500 + 3 * i
  end do
  before = gas

  rc = ejecta_config_defaults(cfg)
  ! Every field holds the library's default, as ejecta.h states it.
  if (cfg%kinetic_fraction /= 0.28d0 .or. cfg%max_infrared_boost /= 3.0d0 .or. &
       cfg%wind_event_energy_erg /= 1.0d51 .or. cfg%photon_reach /= 0 .or. cfg%neighbor_count /= 32 .or. &
       cfg%worker_threads /= 1) call fail('defaults differ from ejecta.h')
  cfg%length_cm = 3.0856775814913673d18
  cfg%mass_g = 1.98841d33
  cfg%velocity_cm_per_s = 1.0d5
  cfg%neighbor_count = k
  cfg%box_size = box
  call ejecta_set_name(cfg%scheme, 'kinetic')
  cfg%kinetic_fraction = 0.5d0

  ! An unknown scheme is refused with a message.
  call ejecta_set_name(cfg%weighting, 'by-popular-vote')
  rc = ejecta_create_checked(cfg, ctx, msg)
  if (rc /= EJECTA_ERR_UNKNOWN_NAME .or. ctx /= 0) call fail('unknown weighting accepted')
  print '(a,a)', 'create_error=', trim(msg)
  call ejecta_set_name(cfg%weighting, 'solid-angle')
  rc = ejecta_create_checked(cfg, ctx, msg)
  if (rc /= EJECTA_OK) then
     print *, 'FAIL create: ', trim(msg)
     stop 2
  end if

  stride = c_sizeof(gas(1))
  desc%count = n_gas
  do a = 1, 3
     desc%position(a) = ejecta_strided(c_loc(gas(1)%pos(a)), stride, EJECTA_FLOAT32)
     desc%velocity(a) = ejecta_strided(c_loc(gas(1)%vel(a)), stride, EJECTA_FLOAT64)
  end do
  desc%mass = ejecta_strided(c_loc(gas(1)%mass), stride, EJECTA_FLOAT64)
  desc%density = ejecta_strided(c_loc(gas(1)%density), stride, EJECTA_FLOAT64)
  desc%internal_energy = ejecta_strided(c_loc(gas(1)%energy), stride, EJECTA_FLOAT64)
  desc%id = ejecta_strided(c_loc(gas(1)%id), stride, EJECTA_INT64)
  species(1) = EJECTA_SPECIES_METALS
  fractions(1) = ejecta_strided(c_loc(gas(1)%metals), stride, EJECTA_FLOAT64)
  desc%n_species = 1
  desc%species = c_loc(species)
  desc%species_fraction = c_loc(fractions)
  call must(ctx, ejecta_bind_gas(ctx, desc), 'bind')

  foe = 1.0d51 / (1.98841d33 * 1.0d10)
  do s = 1, n_stars
     stars(s)%id = 10 + s
     stars(s)%position = [5.9d0 + s, 6.1d0, 0.3d0 * s]
     stars(s)%velocity = [0.0d0, 2.0d0 * s, 0.0d0]
     stars(s)%mass = 1.0d3
     stars(s)%metallicity = 0.0134d0
     stars(s)%age = 4.0d0
     stars(s)%channel = EJECTA_CHANNEL_CORE_COLLAPSE
     stars(s)%ejected_mass = 10.0d0
     stars(s)%species_mass(EJECTA_SPECIES_METALS + 1) = 2.0d0
     stars(s)%energy = foe
     stars(s)%events = 1.0d0
  end do
  call must(ctx, ejecta_step(ctx, stars, int(n_stars, c_int64_t), 0_c_int64_t, EJECTA_NEIGHBORS_OWN_FINDER, &
       c_null_ptr, c_null_ptr), 'step')
  call must(ctx, ejecta_record_count(ctx, n_rec), 'record count')
  if (n_rec /= n_stars * k) call fail('record count')
  allocate(recs(n_rec))
  call must(ctx, ejecta_copy_records(ctx, recs, n_rec, written), 'copy records')
  call must(ctx, ejecta_get_ledger(ctx, led), 'ledger')
  rc = ejecta_ledger_balanced(led, 1.0d-12, cmsg, int(size(cmsg), c_int64_t))
  if (rc /= EJECTA_OK) call fail('ledger does not balance')
  print '(a,g0.17,a,g0.17)', 'ledger_released_mass=', led%released%mass, ' ledger_deposited_mass=', led%deposited%mass
  call must(ctx, ejecta_apply_step_records(ctx, rep), 'apply')

  dm = 0; dm_sum = 0; de_sum = 0
  do i = 1, int(n_rec)
     if (gas(recs(i)%gas_index + 1)%id /= recs(i)%gas_id) call fail('record locates its gas')
     dm(recs(i)%gas_index + 1) = dm(recs(i)%gas_index + 1) + recs(i)%mass
     dm_sum = dm_sum + recs(i)%mass
     de_sum = de_sum + recs(i)%energy
  end do
  gas_dm = 0; gas_de = 0; changed = 0
  do i = 1, n_gas
     if (dm(i) == 0) then
        if (any(gas(i)%vel /= before(i)%vel) .or. gas(i)%mass /= before(i)%mass) call fail('untouched element changed')
        cycle
     end if
     changed = changed + 1
     if (abs((gas(i)%mass - before(i)%mass) - dm(i)) > 1.0d-12 * gas(i)%mass) call fail('element mass change')
     gas_dm = gas_dm + (gas(i)%mass - before(i)%mass)
     ke0 = 0.5d0 * before(i)%mass * sum(before(i)%vel**2)
     ke1 = 0.5d0 * gas(i)%mass * sum(gas(i)%vel**2)
     gas_de = gas_de + (ke1 + gas(i)%mass * gas(i)%energy) - (ke0 + before(i)%mass * before(i)%energy)
  end do
  print '(a,i0,a,i0,a,i0)', 'records=', n_rec, ' elements_changed=', changed, ' report_elements=', rep%elements
  print '(a,g0.17,a,g0.17)', 'record_dm_sum=', dm_sum, ' gas_mass_change=', gas_dm
  print '(a,g0.17,a,g0.17,a,g0.17,a,g0.17)', 'record_de_sum=', de_sum, ' gas_energy_change=', gas_de, &
       ' reclaimed=', rep%reclaimed, ' shortfall=', rep%shortfall
  if (abs(gas_dm - led%deposited%mass) > 1.0d-12 * gas_dm) call fail('gas mass change vs ledger')
  if (abs(gas_de - (de_sum + rep%reclaimed + rep%shortfall)) > 1.0d-10 * led%energy_scale) call fail('energy')

  ! A destroyed context is reported, not a crash.
  stale = ctx
  call must(ctx, ejecta_destroy(ctx), 'destroy')
  if (ctx /= 0) call fail('destroy zeroes the handle')
  rc = ejecta_bind_gas(stale, desc)
  if (rc /= EJECTA_ERR_INVALID_CONTEXT) call fail('bind on a destroyed context')
  print '(a,a)', 'destroyed_error=', ejecta_error_text(stale)

  deallocate(gas, before, dm, recs)
  if (fails > 0) then
     print '(a,i0,a)', 'result fail (', fails, ' checks)'
     stop 1
  end if
  print '(a)', 'result pass'

contains

  subroutine fail(what)
    character(len=*), intent(in) :: what
    write (0, '(a,a)') 'FAIL ', what
    fails = fails + 1
  end subroutine fail

  subroutine must(context, code, what)
    integer(c_int64_t), intent(in) :: context
    integer(c_int), intent(in) :: code
    character(len=*), intent(in) :: what
    if (code /= EJECTA_OK) then
       write (0, '(a,a,a,i0,a,a)') 'FAIL ', what, ': code ', code, ': ', ejecta_error_text(context)
       stop 2
    end if
  end subroutine must

end program ejecta_fortran_host
