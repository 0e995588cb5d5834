! population_host.f90 — a small Fortran host of ejecta's population steps
! through ejecta_mod: one star particle of 5e3 Msun formed, stepped three
! times through ejecta_step_population on a gas lattice, with the yields
! table named on the command line (or the built-in population without
! one). Checks that every ledger balances, that the star's mass loss is
! what the gas gained, and that the records of the far-ultraviolet channel
! (and only those) carry a field G0; prints key=value lines and "result pass", or stops
! with a non-zero code. Code units: pc, Msun, km/s.
program ejecta_population_host
  use, intrinsic :: iso_c_binding
  use ejecta_mod
  implicit none

  type, bind(c) :: gas_element
     real(c_double) :: pos(3), vel(3)
     real(c_double) :: mass, density, energy
     integer(c_int64_t) :: id
  end type gas_element

  integer, parameter :: side = 6, n_gas = side**3, n_steps = 3
  real(c_double), parameter :: box = 12.0d0, myr = 1.0d0 / 0.97779222d0
  type(gas_element), allocatable, target :: gas(:)
  type(ejecta_config) :: cfg
  type(ejecta_population_config) :: pc
  type(ejecta_gas) :: desc
  type(ejecta_star_particle) :: star(1)
  type(ejecta_star_result) :: res(1)
  type(ejecta_ledger) :: led
  type(ejecta_apply_report) :: rep
  type(ejecta_record), allocatable :: recs(:)
  type(ejecta_touched) :: touched_one
  character(kind=c_char), allocatable, target :: path(:)
  character(len=512) :: arg, msg
  character(kind=c_char) :: cmsg(256)
  integer(c_int64_t) :: ctx, written, k, n_rec
  integer(c_size_t) :: stride
  real(c_double) :: h, m0, lost, suggested
  integer :: i, ix, iy, iz, a, fails, supernovae, lit
  integer(c_int) :: rc

  fails = 0
  allocate(recs(1))
  if (c_sizeof(star(1)) /= 104 .or. c_sizeof(res(1)) /= 40 .or. c_sizeof(pc) /= 104 .or. &
       c_sizeof(recs(1)) /= 224 .or. c_sizeof(led) /= 504 .or. c_sizeof(touched_one) /= 64 .or. &
       c_sizeof(cfg) /= 256) &
       call fail('struct sizes differ from ejecta.h')

  allocate(gas(n_gas))
  h = box / side
  do i = 1, n_gas
     ix = mod(i - 1, side); iy = mod((i - 1) / side, side); iz = (i - 1) / (side * side)
     gas(i)%pos = [(ix + 0.5d0) * h, (iy + 0.5d0) * h, (iz + 0.5d0) * h]
     gas(i)%vel = [0.1d0 * ix, 0.0d0, -0.05d0 * iz]
     gas(i)%density = 3.45d0
     gas(i)%mass = gas(i)%density * h**3
     gas(i)%energy = 100.0d0
     gas(i)%id = 7 + 2 * i
  end do
  m0 = sum(gas%mass)

  rc = ejecta_config_defaults(cfg)
  cfg%length_cm = 3.0856775814913673d18
  cfg%mass_g = 1.988409870698051d33
  cfg%velocity_cm_per_s = 1.0d5
  cfg%box_size = box
  cfg%seed = 99
  rc = ejecta_create_checked(cfg, ctx, msg)
  if (rc /= EJECTA_OK) call fail('create: ' // trim(msg))

  stride = c_sizeof(gas(1))
  do a = 1, 3
     desc%position(a) = ejecta_strided(c_loc(gas(1)%pos(a)), stride, EJECTA_FLOAT64)
     desc%velocity(a) = ejecta_strided(c_loc(gas(1)%vel(a)), stride, EJECTA_FLOAT64)
  end do
  desc%count = n_gas
  desc%mass = ejecta_strided(c_loc(gas(1)%mass), stride, EJECTA_FLOAT64)
  desc%density = ejecta_strided(c_loc(gas(1)%density), stride, EJECTA_FLOAT64)
  desc%internal_energy = ejecta_strided(c_loc(gas(1)%energy), stride, EJECTA_FLOAT64)
  desc%id = ejecta_strided(c_loc(gas(1)%id), stride, EJECTA_INT64)
  call must(ejecta_bind_gas(ctx, desc), 'bind')

  ! An unknown IMF is refused with its code.
  rc = ejecta_population_defaults(pc)
  call ejecta_set_name(pc%imf, 'flat')
  if (ejecta_enable_population(ctx, pc) /= EJECTA_ERR_UNKNOWN_NAME) call fail('unknown IMF accepted')
  print '(a,a)', 'imf_error=', ejecta_error_text(ctx)
  ! No population yet: the step is refused.
  star(1)%id = 41
  star(1)%position = [6.1d0, 5.9d0, 6.2d0]
  star(1)%velocity = [1.0d0, 0.0d0, 0.0d0]
  star(1)%formed_mass = 5.0d3
  star(1)%mass = 5.0d3
  star(1)%metallicity = 0.0134d0
  star(1)%age = 3.0d0 * myr
  rc = ejecta_step_population(ctx, star, 1_c_int64_t, myr, 0_c_int64_t, EJECTA_NEIGHBORS_OWN_FINDER, &
       c_null_ptr, c_null_ptr)
  if (rc /= EJECTA_ERR_NO_POPULATION) call fail('step without population accepted')

  rc = ejecta_population_defaults(pc)
  if (command_argument_count() >= 1) then
     call get_command_argument(1, arg)
     call ejecta_c_string(arg, path)
     pc%yields_table = c_loc(path)
  end if
  call must(ejecta_enable_population(ctx, pc), 'enable population')

  lost = 0
  supernovae = 0
  lit = 0
  do k = 0, n_steps - 1
     call must(ejecta_step_population(ctx, star, 1_c_int64_t, 1.5d0 * myr, k, EJECTA_NEIGHBORS_OWN_FINDER, &
          c_null_ptr, c_null_ptr), 'population step')
     call must(ejecta_get_ledger(ctx, led), 'ledger')
     cmsg = c_null_char
     if (ejecta_ledger_balanced(led, 1.0d-12, cmsg, int(size(cmsg), c_int64_t)) /= EJECTA_OK) &
          call fail('ledger does not balance')
     call must(ejecta_copy_star_results(ctx, res, 1_c_int64_t, written), 'results')
     if (written /= 1 .or. res(1)%id /= star(1)%id) call fail('results')
     if (abs(res(1)%mass_loss - led%deposited%mass) > 1.0d-12 * res(1)%mass_loss) call fail('mass loss vs ledger')
     call must(ejecta_suggested_step(ctx, suggested), 'suggested step')
     call must(ejecta_record_count(ctx, n_rec), 'record count')
     deallocate(recs)
     allocate(recs(max(n_rec, 1_c_int64_t)))
     call must(ejecta_copy_records(ctx, recs, n_rec, written), 'records')
     do i = 1, int(written)
        if (recs(i)%channel == EJECTA_CHANNEL_PHOTOELECTRIC_HEATING) then
           lit = lit + 1
           if (.not. (recs(i)%fuv_field > 0)) call fail('far-ultraviolet record without a field')
        else if (recs(i)%fuv_field /= 0) then
           call fail('a field on a record of another channel')
        end if
     end do
     call must(ejecta_apply_step_records(ctx, rep), 'apply')
     star(1)%mass = star(1)%mass - res(1)%mass_loss
     star(1)%carried_energy = res(1)%carried_energy
     star(1)%age = star(1)%age + 1.5d0 * myr
     lost = lost + res(1)%mass_loss
     supernovae = supernovae + int(res(1)%supernovae_cc)
  end do
  print '(a,g0.17,a,g0.17)', 'star_mass_loss=', lost, ' gas_mass_gain=', sum(gas%mass) - m0
  print '(a,i0)', 'supernovae_cc=', supernovae
  print '(a,i0)', 'lit_records=', lit
  if (lit == 0) call fail('no far-ultraviolet records')
  if (abs(sum(gas%mass) - m0 - lost) > 1.0d-12 * m0) call fail('gas gain differs from the star''s loss')
  if (lost <= 0) call fail('no mass lost')
  deallocate(recs)
  call must(ejecta_destroy(ctx), 'destroy')

  if (fails > 0) then
     print '(a)', 'result fail'
     stop 1
  end if
  print '(a)', 'result pass'

contains

  subroutine must(code, what)
    integer(c_int), intent(in) :: code
    character(len=*), intent(in) :: what
    if (code /= EJECTA_OK) then
       write (0, '(a,a,a,i0,a,a)') 'FAIL ', what, ': code ', code, ': ', ejecta_error_text(ctx)
       stop 2
    end if
  end subroutine must

  subroutine fail(what)
    character(len=*), intent(in) :: what
    write (0, '(a,a)') 'FAIL ', what
    fails = fails + 1
  end subroutine fail

end program ejecta_population_host
