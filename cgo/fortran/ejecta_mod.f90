! ejecta_mod — Fortran 2008 bindings (ISO_C_BINDING) of the ejecta C
! interface, ejecta.h. Types mirror the C structs field for field; the
! interfaces bind the C functions of the same names, with the same
! arguments, return codes, units, ownership and thread-safety rules as
! documented in ejecta.h. Indices in records and neighbor rows are 0-based
! as in C. The copy calls (ejecta_copy_*) follow ejecta.h's copy rule:
! written always receives the number of entries there are, the first
! min(written, capacity) are copied, and EJECTA_ERR_BUFFER_TOO_SMALL says
! there were more than capacity. Helpers at the end fill name fields,
! describe strided columns and fetch error text as Fortran strings.
module ejecta_mod
  use, intrinsic :: iso_c_binding
  implicit none
  private

  ! Error codes (ejecta.h EJECTA_OK, EJECTA_ERR_*).
  integer(c_int), parameter, public :: EJECTA_OK = 0, EJECTA_ERR_NULL_POINTER = 1, &
       EJECTA_ERR_INVALID_ARGUMENT = 2, EJECTA_ERR_UNKNOWN_NAME = 3, &
       EJECTA_ERR_INVALID_CONTEXT = 4, EJECTA_ERR_NO_GAS = 5, EJECTA_ERR_BAD_VALUE = 6, &
       EJECTA_ERR_NEIGHBORS = 7, EJECTA_ERR_BUFFER_TOO_SMALL = 8, EJECTA_ERR_UNKNOWN_GAS = 9, &
       EJECTA_ERR_BUSY = 10, EJECTA_ERR_UNDEPOSITED = 11, EJECTA_ERR_IMBALANCE = 12, &
       EJECTA_ERR_ALREADY_APPLIED = 13, EJECTA_ERR_NO_POPULATION = 14, EJECTA_ERR_YIELDS_TABLE = 15, &
       EJECTA_ERR_REMNANT_TABLE = 16, EJECTA_ERR_DUMP_FILE = 17, EJECTA_ERR_INTERNAL = 99
  integer(c_int32_t), parameter, public :: EJECTA_ABI_VERSION = 6
  ! Element types.
  integer(c_int32_t), parameter, public :: EJECTA_FLOAT64 = 1, EJECTA_FLOAT32 = 2, &
       EJECTA_INT64 = 3, EJECTA_INT32 = 4
  ! Species codes (0-based: add 1 to index a Fortran species_mass array).
  integer(c_int32_t), parameter, public :: EJECTA_SPECIES_METALS = 0, EJECTA_SPECIES_HYDROGEN = 1, &
       EJECTA_SPECIES_HELIUM = 2, EJECTA_SPECIES_CARBON = 3, EJECTA_SPECIES_NITROGEN = 4, &
       EJECTA_SPECIES_OXYGEN = 5, EJECTA_SPECIES_NEON = 6, EJECTA_SPECIES_MAGNESIUM = 7, &
       EJECTA_SPECIES_SILICON = 8, EJECTA_SPECIES_SULFUR = 9, EJECTA_SPECIES_CALCIUM = 10, &
       EJECTA_SPECIES_IRON = 11
  integer, parameter, public :: EJECTA_NUM_SPECIES = 12, EJECTA_NAME_CAPACITY = 48
  ! Channels, neighbor modes, record locating, flags.
  integer(c_int32_t), parameter, public :: EJECTA_CHANNEL_CORE_COLLAPSE = 0, EJECTA_CHANNEL_TYPE_IA = 1, &
       EJECTA_CHANNEL_MASSIVE_WINDS = 2, EJECTA_CHANNEL_AGB_WINDS = 3, &
       EJECTA_CHANNEL_RADIATION_PRESSURE = 4, EJECTA_CHANNEL_PHOTOIONIZATION = 5, &
       EJECTA_CHANNEL_PHOTOELECTRIC_HEATING = 6
  integer, parameter, public :: EJECTA_NUM_STEP_CHANNELS = 7
  integer(c_int32_t), parameter, public :: EJECTA_NEIGHBORS_OWN_FINDER = 0, EJECTA_NEIGHBORS_HOST_ROWS = 1
  integer(c_int32_t), parameter, public :: EJECTA_LOCATE_BY_INDEX = 0, EJECTA_LOCATE_BY_ID = 1
  integer(c_int32_t), parameter, public :: EJECTA_FLAG_CAPPED = 1, EJECTA_FLAG_LIMITED = 2, &
       EJECTA_FLAG_IONIZED = 4, EJECTA_FLAG_HOLD_COOLING = 8, EJECTA_FLAG_STOCHASTIC = 16, &
       EJECTA_FLAG_HYDRO_DECOUPLED = 32

  ! ejecta_config (seed is uint64_t in C: use non-negative values). Fill it
  ! with ejecta_config_defaults: every field is used as it is, zero
  ! included.
  type, bind(c), public :: ejecta_config
     real(c_double) :: length_cm, mass_g, velocity_cm_per_s
     real(c_double) :: kinetic_fraction, coupling_radius
     real(c_double) :: box_size(3)
     integer(c_int64_t) :: seed
     integer(c_int32_t) :: neighbor_count, worker_threads, isotropy_correction, photon_reach
     character(kind=c_char) :: scheme(EJECTA_NAME_CAPACITY)
     character(kind=c_char) :: remnant_fit(EJECTA_NAME_CAPACITY)
     character(kind=c_char) :: weighting(EJECTA_NAME_CAPACITY)
     type(c_ptr) :: remnant_table  ! NUL-terminated path or c_null_ptr
     real(c_double) :: max_infrared_boost     ! >= 1; ieee_value(.., ieee_positive_inf): no bound
     real(c_double) :: wind_event_energy_erg  ! erg, > 0
  end type ejecta_config

  type, bind(c), public :: ejecta_field
     type(c_ptr) :: data = c_null_ptr
     integer(c_int64_t) :: stride = 0
     integer(c_int32_t) :: elem_type = 0, reserved = 0
  end type ejecta_field

  type, bind(c), public :: ejecta_gas
     integer(c_int64_t) :: count = 0
     type(ejecta_field) :: position(3), velocity(3)
     type(ejecta_field) :: mass, density, internal_energy, smoothing_length, id
     integer(c_int32_t) :: n_species = 0, reserved = 0
     type(c_ptr) :: species = c_null_ptr           ! int32_t codes
     type(c_ptr) :: species_fraction = c_null_ptr  ! ejecta_field array
  end type ejecta_gas

  type, bind(c), public :: ejecta_star
     integer(c_int64_t) :: id = 0
     real(c_double) :: position(3) = 0, velocity(3) = 0
     real(c_double) :: mass = 0, metallicity = 0, age = 0
     integer(c_int32_t) :: channel = 0, reserved = 0
     real(c_double) :: ejected_mass = 0
     real(c_double) :: species_mass(EJECTA_NUM_SPECIES) = 0
     real(c_double) :: energy = 0, events = 0, photons = 0, duration = 0
     real(c_double) :: new_stellar_mass = 0, dispersion = 0
  end type ejecta_star

  type, bind(c), public :: ejecta_record
     integer(c_int64_t) :: gas_index, gas_id, star_id
     integer(c_int32_t) :: channel, flags
     real(c_double) :: mass
     real(c_double) :: species_mass(EJECTA_NUM_SPECIES)
     real(c_double) :: momentum(3)
     real(c_double) :: energy, heat, radiated, hold_cooling_until, kick, heating
     real(c_double) :: hydro_decoupled_until, fuv_field
  end type ejecta_record

  type, bind(c), public :: ejecta_quantities
     real(c_double) :: mass
     real(c_double) :: species_mass(EJECTA_NUM_SPECIES)
     real(c_double) :: momentum(3)
     real(c_double) :: energy
  end type ejecta_quantities

  type, bind(c), public :: ejecta_ledger
     type(ejecta_quantities) :: released, deposited, undeposited
     real(c_double) :: radiated
     integer(c_int64_t) :: stars, skipped, capped, limited
     real(c_double) :: max_isotropy_residual, sum_isotropy_residual
     real(c_double) :: radial_momentum, momentum_scale, energy_scale
     real(c_double) :: kick_energy, heat
  end type ejecta_ledger

  type, bind(c), public :: ejecta_apply_report
     integer(c_int64_t) :: records, elements
     type(ejecta_quantities) :: deposited
     real(c_double) :: reclaimed, shortfall
     integer(c_int64_t) :: shortfall_elements
  end type ejecta_apply_report

  type, bind(c), public :: ejecta_touched
     integer(c_int64_t) :: gas_index, gas_id
     real(c_double) :: max_kick, max_heating, hold_cooling_until
     real(c_double) :: hydro_decoupled_until, fuv_field
     integer(c_int32_t) :: flags, reserved
  end type ejecta_touched

  ! ejecta_population_config. Fill it with ejecta_population_defaults:
  ! every field is used as it is. yields_table is c_null_ptr (built-in
  ! population) or c_loc of a NUL-terminated character(kind=c_char) array
  ! with the target attribute (see ejecta_c_string).
  type, bind(c), public :: ejecta_population_config
     character(kind=c_char) :: imf(EJECTA_NAME_CAPACITY)
     real(c_double) :: lightest_star_mass, heaviest_star_mass, max_supernovae_per_step
     type(c_ptr) :: yields_table = c_null_ptr
     integer(c_int32_t) :: winds, radiation_pressure, photoionization, delayed_cooling
     integer(c_int32_t) :: photoelectric_heating, reserved
  end type ejecta_population_config

  type, bind(c), public :: ejecta_star_particle
     integer(c_int64_t) :: id = 0
     real(c_double) :: position(3) = 0, velocity(3) = 0
     real(c_double) :: mass = 0, formed_mass = 0, metallicity = 0, age = 0, carried_energy = 0
     real(c_double) :: new_stellar_mass = 0
  end type ejecta_star_particle

  type, bind(c), public :: ejecta_star_result
     integer(c_int64_t) :: id
     real(c_double) :: mass_loss, carried_energy
     integer(c_int64_t) :: supernovae_cc, supernovae_ia
  end type ejecta_star_result

  ! ejecta_star_columns: the stars of a step and their releases, column by
  ! column, for ejecta_dump_stars (radiated optional: leave its data
  ! c_null_ptr). species is c_loc of int32 codes, species_mass c_loc of an
  ! ejecta_field array.
  type, bind(c), public :: ejecta_star_columns
     integer(c_int64_t) :: count = 0
     type(ejecta_field) :: id, position(3), velocity(3)
     type(ejecta_field) :: coupling_radius, ejecta_mass, energy, radiated
     integer(c_int32_t) :: n_species = 0, reserved = 0
     type(c_ptr) :: species = c_null_ptr
     type(c_ptr) :: species_mass = c_null_ptr
  end type ejecta_star_columns

  public :: ejecta_population_defaults, ejecta_enable_population, ejecta_step_population, &
       ejecta_copy_star_results, ejecta_suggested_step, ejecta_get_channel_ledger, ejecta_c_string, &
       ejecta_choose_species, ejecta_species_count, ejecta_species_symbol
  public :: ejecta_version, ejecta_config_defaults, ejecta_create, ejecta_destroy, &
       ejecta_last_error, ejecta_bind_gas, ejecta_step, ejecta_record_count, ejecta_copy_undeposited, &
       ejecta_copy_records, ejecta_get_ledger, ejecta_apply_step_records, &
       ejecta_apply_records, ejecta_copy_touched, ejecta_ledger_balanced
  public :: ejecta_set_name, ejecta_strided, ejecta_error_text, ejecta_create_checked
  public :: ejecta_dump_open, ejecta_dump_gas_before, ejecta_dump_gas_after, ejecta_dump_stars, &
       ejecta_dump_finish, ejecta_dump_close, ejecta_dump_last_error, ejecta_dump_open_checked, &
       ejecta_dump_error_text

  interface
     integer(c_int) function ejecta_version(buffer, capacity, abi_version) bind(c, name='ejecta_version')
       import :: c_int, c_char, c_int64_t, c_int32_t
       character(kind=c_char), intent(out) :: buffer(*)
       integer(c_int64_t), value :: capacity
       integer(c_int32_t), intent(out) :: abi_version
     end function ejecta_version

     integer(c_int) function ejecta_config_defaults(config) bind(c, name='ejecta_config_defaults')
       import :: c_int, ejecta_config
       type(ejecta_config), intent(out) :: config
     end function ejecta_config_defaults

     integer(c_int) function ejecta_create(config, context, error_text, capacity) bind(c, name='ejecta_create')
       import :: c_int, c_int64_t, c_char, ejecta_config
       type(ejecta_config), intent(in) :: config
       integer(c_int64_t), intent(out) :: context
       character(kind=c_char), intent(out) :: error_text(*)
       integer(c_int64_t), value :: capacity
     end function ejecta_create

     integer(c_int) function ejecta_destroy(context) bind(c, name='ejecta_destroy')
       import :: c_int, c_int64_t
       integer(c_int64_t), intent(inout) :: context
     end function ejecta_destroy

     integer(c_int) function ejecta_last_error(context, buffer, capacity, length) bind(c, name='ejecta_last_error')
       import :: c_int, c_int64_t, c_char
       integer(c_int64_t), value :: context
       character(kind=c_char), intent(out) :: buffer(*)
       integer(c_int64_t), value :: capacity
       integer(c_int64_t), intent(out) :: length
     end function ejecta_last_error

     integer(c_int) function ejecta_bind_gas(context, gas) bind(c, name='ejecta_bind_gas')
       import :: c_int, c_int64_t, ejecta_gas
       integer(c_int64_t), value :: context
       type(ejecta_gas), intent(in) :: gas
     end function ejecta_bind_gas

     ! step_index: the host's step number (>= 0), which keys the draws.
     ! row_offsets and row_indices: c_loc of int64 arrays, or c_null_ptr
     ! with EJECTA_NEIGHBORS_OWN_FINDER.
     integer(c_int) function ejecta_step(context, stars, n_stars, step_index, neighbor_mode, row_offsets, row_indices) &
          bind(c, name='ejecta_step')
       import :: c_int, c_int64_t, c_int32_t, c_ptr, ejecta_star
       integer(c_int64_t), value :: context
       type(ejecta_star), intent(in) :: stars(*)
       integer(c_int64_t), value :: n_stars, step_index
       integer(c_int32_t), value :: neighbor_mode
       type(c_ptr), value :: row_offsets, row_indices
     end function ejecta_step

     integer(c_int) function ejecta_copy_undeposited(context, star_ids, channels, capacity, written) &
          bind(c, name='ejecta_copy_undeposited')
       import :: c_int, c_int64_t, c_int32_t
       integer(c_int64_t), value :: context
       integer(c_int64_t), intent(out) :: star_ids(*)
       integer(c_int32_t), intent(out) :: channels(*)
       integer(c_int64_t), value :: capacity
       integer(c_int64_t), intent(out) :: written
     end function ejecta_copy_undeposited

     integer(c_int) function ejecta_record_count(context, count) bind(c, name='ejecta_record_count')
       import :: c_int, c_int64_t
       integer(c_int64_t), value :: context
       integer(c_int64_t), intent(out) :: count
     end function ejecta_record_count

     integer(c_int) function ejecta_copy_records(context, records, capacity, written) bind(c, name='ejecta_copy_records')
       import :: c_int, c_int64_t, ejecta_record
       integer(c_int64_t), value :: context
       type(ejecta_record), intent(out) :: records(*)
       integer(c_int64_t), value :: capacity
       integer(c_int64_t), intent(out) :: written
     end function ejecta_copy_records

     integer(c_int) function ejecta_get_ledger(context, ledger) bind(c, name='ejecta_get_ledger')
       import :: c_int, c_int64_t, ejecta_ledger
       integer(c_int64_t), value :: context
       type(ejecta_ledger), intent(out) :: ledger
     end function ejecta_get_ledger

     integer(c_int) function ejecta_apply_step_records(context, report) bind(c, name='ejecta_apply_step_records')
       import :: c_int, c_int64_t, ejecta_apply_report
       integer(c_int64_t), value :: context
       type(ejecta_apply_report), intent(out) :: report
     end function ejecta_apply_step_records

     integer(c_int) function ejecta_apply_records(context, records, n_records, locate, report) &
          bind(c, name='ejecta_apply_records')
       import :: c_int, c_int64_t, c_int32_t, ejecta_record, ejecta_apply_report
       integer(c_int64_t), value :: context
       type(ejecta_record), intent(in) :: records(*)
       integer(c_int64_t), value :: n_records
       integer(c_int32_t), value :: locate
       type(ejecta_apply_report), intent(out) :: report
     end function ejecta_apply_records

     integer(c_int) function ejecta_copy_touched(context, touched, capacity, written) bind(c, name='ejecta_copy_touched')
       import :: c_int, c_int64_t, ejecta_touched
       integer(c_int64_t), value :: context
       type(ejecta_touched), intent(out) :: touched(*)
       integer(c_int64_t), value :: capacity
       integer(c_int64_t), intent(out) :: written
     end function ejecta_copy_touched

     integer(c_int) function ejecta_ledger_balanced(ledger, relative_tolerance, message, capacity) &
          bind(c, name='ejecta_ledger_balanced')
       import :: c_int, c_int64_t, c_double, c_char, ejecta_ledger
       type(ejecta_ledger), intent(in) :: ledger
       real(c_double), value :: relative_tolerance
       character(kind=c_char), intent(out) :: message(*)
       integer(c_int64_t), value :: capacity
     end function ejecta_ledger_balanced

     integer(c_int) function ejecta_population_defaults(config) bind(c, name='ejecta_population_defaults')
       import :: c_int, ejecta_population_config
       type(ejecta_population_config), intent(out) :: config
     end function ejecta_population_defaults

     integer(c_int) function ejecta_enable_population(context, config) bind(c, name='ejecta_enable_population')
       import :: c_int, c_int64_t, ejecta_population_config
       integer(c_int64_t), value :: context
       type(ejecta_population_config), intent(in) :: config
     end function ejecta_enable_population

     ! row_offsets and row_indices as in ejecta_step.
     integer(c_int) function ejecta_step_population(context, stars, n_stars, dt, step_index, neighbor_mode, &
          row_offsets, row_indices) bind(c, name='ejecta_step_population')
       import :: c_int, c_int64_t, c_int32_t, c_double, c_ptr, ejecta_star_particle
       integer(c_int64_t), value :: context
       type(ejecta_star_particle), intent(in) :: stars(*)
       integer(c_int64_t), value :: n_stars
       real(c_double), value :: dt
       integer(c_int64_t), value :: step_index
       integer(c_int32_t), value :: neighbor_mode
       type(c_ptr), value :: row_offsets, row_indices
     end function ejecta_step_population

     integer(c_int) function ejecta_copy_star_results(context, results, capacity, written) &
          bind(c, name='ejecta_copy_star_results')
       import :: c_int, c_int64_t, ejecta_star_result
       integer(c_int64_t), value :: context
       type(ejecta_star_result), intent(out) :: results(*)
       integer(c_int64_t), value :: capacity
       integer(c_int64_t), intent(out) :: written
     end function ejecta_copy_star_results

     ! Which elements the context tracks: a NUL-terminated, comma-separated
     ! list of chemical symbols (e.g. ejecta_c_string('Fe,O')); species codes
     ! 1, 2, ... in that order, 0 the total metals. Before ejecta_bind_gas.
     integer(c_int) function ejecta_choose_species(context, elements) bind(c, name='ejecta_choose_species')
       import :: c_int, c_int64_t, c_char
       integer(c_int64_t), value :: context
       character(kind=c_char), intent(in) :: elements(*)
     end function ejecta_choose_species

     integer(c_int) function ejecta_species_count(context, count) bind(c, name='ejecta_species_count')
       import :: c_int, c_int64_t, c_int32_t
       integer(c_int64_t), value :: context
       integer(c_int32_t), intent(out) :: count
     end function ejecta_species_count

     integer(c_int) function ejecta_species_symbol(context, code, buffer, capacity) bind(c, name='ejecta_species_symbol')
       import :: c_int, c_int64_t, c_int32_t, c_char
       integer(c_int64_t), value :: context
       integer(c_int32_t), value :: code
       character(kind=c_char), intent(out) :: buffer(*)
       integer(c_int64_t), value :: capacity
     end function ejecta_species_symbol

     integer(c_int) function ejecta_suggested_step(context, dt) bind(c, name='ejecta_suggested_step')
       import :: c_int, c_int64_t, c_double
       integer(c_int64_t), value :: context
       real(c_double), intent(out) :: dt
     end function ejecta_suggested_step

     integer(c_int) function ejecta_get_channel_ledger(context, channel, ledger) bind(c, name='ejecta_get_channel_ledger')
       import :: c_int, c_int64_t, c_int32_t, ejecta_ledger
       integer(c_int64_t), value :: context
       integer(c_int32_t), value :: channel
       type(ejecta_ledger), intent(out) :: ledger
     end function ejecta_get_channel_ledger

     ! Audit dumps (ejecta.h "audit dumps"): a dump session handle is an
     ! integer(c_int64_t), 0 when none. directory and species are
     ! NUL-terminated (ejecta_c_string); species '' (just the NUL) is the
     ! default set. box_size: zeros for an open box. ejecta_dump_open_checked
     ! takes Fortran strings.
     integer(c_int) function ejecta_dump_open(directory, species, box_size, dump, error_text, capacity) &
          bind(c, name='ejecta_dump_open')
       import :: c_int, c_int64_t, c_char, c_double
       character(kind=c_char), intent(in) :: directory(*), species(*)
       real(c_double), intent(in) :: box_size(3)
       integer(c_int64_t), intent(out) :: dump
       character(kind=c_char), intent(out) :: error_text(*)
       integer(c_int64_t), value :: capacity
     end function ejecta_dump_open

     integer(c_int) function ejecta_dump_gas_before(dump, gas) bind(c, name='ejecta_dump_gas_before')
       import :: c_int, c_int64_t, ejecta_gas
       integer(c_int64_t), value :: dump
       type(ejecta_gas), intent(in) :: gas
     end function ejecta_dump_gas_before

     integer(c_int) function ejecta_dump_gas_after(dump, gas) bind(c, name='ejecta_dump_gas_after')
       import :: c_int, c_int64_t, ejecta_gas
       integer(c_int64_t), value :: dump
       type(ejecta_gas), intent(in) :: gas
     end function ejecta_dump_gas_after

     integer(c_int) function ejecta_dump_stars(dump, stars) bind(c, name='ejecta_dump_stars')
       import :: c_int, c_int64_t, ejecta_star_columns
       integer(c_int64_t), value :: dump
       type(ejecta_star_columns), intent(in) :: stars
     end function ejecta_dump_stars

     integer(c_int) function ejecta_dump_finish(dump) bind(c, name='ejecta_dump_finish')
       import :: c_int, c_int64_t
       integer(c_int64_t), value :: dump
     end function ejecta_dump_finish

     integer(c_int) function ejecta_dump_close(dump) bind(c, name='ejecta_dump_close')
       import :: c_int, c_int64_t
       integer(c_int64_t), intent(inout) :: dump
     end function ejecta_dump_close

     integer(c_int) function ejecta_dump_last_error(dump, buffer, capacity, length) bind(c, name='ejecta_dump_last_error')
       import :: c_int, c_int64_t, c_char
       integer(c_int64_t), value :: dump
       character(kind=c_char), intent(out) :: buffer(*)
       integer(c_int64_t), value :: capacity
       integer(c_int64_t), intent(out) :: length
     end function ejecta_dump_last_error
  end interface

contains

  ! c_buffer_text returns the characters of a C buffer up to its first NUL
  ! (or its end) as a Fortran string.
  function c_buffer_text(buf) result(text)
    character(kind=c_char), intent(in) :: buf(:)
    character(len=:), allocatable :: text
    integer :: i, n
    n = size(buf)
    do i = 1, size(buf)
       if (buf(i) == c_null_char) then
          n = i - 1
          exit
       end if
    end do
    allocate(character(len=n) :: text)
    do i = 1, n
       text(i:i) = buf(i)
    end do
  end function c_buffer_text

  ! ejecta_c_string copies a Fortran string, trailing blanks dropped, into
  ! a NUL-terminated character(kind=c_char) array (allocated here). Give
  ! the array the target attribute and pass c_loc(array) as
  ! ejecta_population_config%yields_table; keep it alive until
  ! ejecta_enable_population returns.
  subroutine ejecta_c_string(text, array)
    character(len=*), intent(in) :: text
    character(kind=c_char), allocatable, intent(out) :: array(:)
    integer :: i, n
    n = len_trim(text)
    allocate(array(n + 1))
    do i = 1, n
       array(i) = text(i:i)
    end do
    array(n + 1) = c_null_char
  end subroutine ejecta_c_string

  ! ejecta_set_name copies a Fortran string into a NUL-terminated name
  ! field of ejecta_config (scheme, remnant_fit, weighting). Trailing blanks
  ! are dropped; names longer than EJECTA_NAME_CAPACITY-1 are truncated
  ! (and then refused by ejecta_create as unknown).
  subroutine ejecta_set_name(field, name)
    character(kind=c_char), intent(out) :: field(EJECTA_NAME_CAPACITY)
    character(len=*), intent(in) :: name
    integer :: i, n
    field = c_null_char
    n = min(len_trim(name), EJECTA_NAME_CAPACITY - 1)
    do i = 1, n
       field(i) = name(i:i)
    end do
  end subroutine ejecta_set_name

  ! ejecta_strided describes one column: first is c_loc of element 1's
  ! field (e.g. c_loc(gas(1)%mass)), stride the bytes between elements
  ! (c_sizeof(gas(1)) for an array of derived type), elem_type one of
  ! EJECTA_FLOAT64/FLOAT32/INT64/INT32.
  function ejecta_strided(first, stride, elem_type) result(f)
    type(c_ptr), intent(in) :: first
    integer(c_size_t), intent(in) :: stride
    integer(c_int32_t), intent(in) :: elem_type
    type(ejecta_field) :: f
    f%data = first
    f%stride = int(stride, c_int64_t)
    f%elem_type = elem_type
    f%reserved = 0
  end function ejecta_strided

  ! ejecta_error_text returns the last error message of a context as a
  ! Fortran string (up to 1023 characters).
  function ejecta_error_text(context) result(text)
    integer(c_int64_t), intent(in) :: context
    character(len=:), allocatable :: text
    character(kind=c_char) :: buf(1024)
    integer(c_int64_t) :: length
    integer(c_int) :: rc
    buf = c_null_char
    rc = ejecta_last_error(context, buf, int(size(buf), c_int64_t), length)
    text = c_buffer_text(buf)
  end function ejecta_error_text

  ! ejecta_create_checked creates a context and returns the error text of a
  ! failed create in message (blank on success).
  integer(c_int) function ejecta_create_checked(config, context, message) result(rc)
    type(ejecta_config), intent(in) :: config
    integer(c_int64_t), intent(out) :: context
    character(len=*), intent(out) :: message
    character(kind=c_char) :: buf(512)
    buf = c_null_char
    rc = ejecta_create(config, context, buf, int(size(buf), c_int64_t))
    message = c_buffer_text(buf)
  end function ejecta_create_checked

  ! ejecta_dump_open_checked opens a dump session from Fortran strings
  ! (trailing blanks dropped; species blank for the default set) and
  ! returns the error text of a failed open in message (blank on success).
  integer(c_int) function ejecta_dump_open_checked(directory, species, box_size, dump, message) result(rc)
    character(len=*), intent(in) :: directory, species
    real(c_double), intent(in) :: box_size(3)
    integer(c_int64_t), intent(out) :: dump
    character(len=*), intent(out) :: message
    character(kind=c_char), allocatable :: dir_c(:), species_c(:)
    character(kind=c_char) :: buf(512)
    call ejecta_c_string(directory, dir_c)
    call ejecta_c_string(species, species_c)
    buf = c_null_char
    rc = ejecta_dump_open(dir_c, species_c, box_size, dump, buf, int(size(buf), c_int64_t))
    message = c_buffer_text(buf)
  end function ejecta_dump_open_checked

  ! ejecta_dump_error_text returns the last error message of a dump session
  ! as a Fortran string (up to 1023 characters).
  function ejecta_dump_error_text(dump) result(text)
    integer(c_int64_t), intent(in) :: dump
    character(len=:), allocatable :: text
    character(kind=c_char) :: buf(1024)
    integer(c_int64_t) :: length
    integer(c_int) :: rc
    buf = c_null_char
    rc = ejecta_dump_last_error(dump, buf, int(size(buf), c_int64_t), length)
    text = c_buffer_text(buf)
  end function ejecta_dump_error_text

end module ejecta_mod
