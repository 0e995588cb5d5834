/*
 * ejecta.h — the C interface of ejecta, a library that couples stellar
 * feedback (supernova ejecta, metals, energy, momentum, winds) from star
 * particles into the gas of a host hydrodynamics code, conserving mass,
 * every species, momentum and energy, with a ledger of everything that went
 * in.
 *
 * Link with libejecta.so (c-shared) or libejecta.a (c-archive); see
 * cgo/README.md for the build and link commands.
 *
 * Conventions that hold for every function below
 * -------------------------------------------------
 * - Every function returns an int: EJECTA_OK (0) on success, otherwise one of
 *   the EJECTA_ERR_* codes. After a failure on a context, ejecta_last_error
 *   gives the reason as text. Besides the codes each function lists, every
 *   call on a context may return EJECTA_ERR_INVALID_CONTEXT (handle 0,
 *   destroyed or made up) and EJECTA_ERR_BUSY (see thread safety), and any
 *   call may return EJECTA_ERR_INTERNAL.
 * - Copy calls (ejecta_copy_records, ejecta_copy_undeposited,
 *   ejecta_copy_touched, ejecta_copy_star_results) share one rule: the
 *   caller's buffer has room for capacity entries (it may be NULL when
 *   capacity is 0); *written always receives the number of entries there
 *   are; the first min(that number, capacity) are copied; when there are
 *   more than capacity the call returns EJECTA_ERR_BUFFER_TOO_SMALL after
 *   copying those. So a call with capacity 0 asks for the count, and a
 *   short buffer is grown to *written and the call repeated.
 *   ejecta_last_error's *length follows the same rule for text.
 * - Units: every quantity passed in or out is in the host's code units, as
 *   declared once in ejecta_config (cm, g and cm/s per code unit of length,
 *   mass and velocity; time is length/velocity, energy mass*velocity^2,
 *   density mass/length^3, specific energy velocity^2), except settings
 *   whose name or comment states their unit (length_cm, mass_g,
 *   velocity_cm_per_s, wind_event_energy_erg, the IMF masses in Msun).
 * - Configs: every field of ejecta_config and ejecta_population_config
 *   means what it says, zero included: no value stands for "the
 *   default", and a value that has no meaning (a neighbor count of 0) is
 *   refused. Fill a config with ejecta_config_defaults or
 *   ejecta_population_defaults, which write the library's defaults into
 *   every field, then change what you need; a config left zeroed is
 *   refused (its units are 0).
 * - Indices are 0-based everywhere (Fortran hosts subtract 1).
 * - Ownership: ejecta never keeps or frees a pointer handed to it except the
 *   gas columns bound with ejecta_bind_gas, which it reads and writes until
 *   the next ejecta_bind_gas or ejecta_destroy on that context. Everything
 *   ejecta returns is copied into memory the caller owns. No memory of the
 *   library's runtime is ever handed to the caller.
 * - Thread safety: a context may be used by one host thread at a time. A
 *   call made on a context while another call on the same context is still
 *   running returns EJECTA_ERR_BUSY and changes nothing. Separate contexts
 *   share no state and may be used from separate threads at once. The
 *   context-free functions (ejecta_version, ejecta_config_defaults,
 *   ejecta_population_defaults, ejecta_ledger_balanced, ejecta_dump_open)
 *   may be called from any thread at any time. Audit dump sessions
 *   (ejecta_dump_*) follow the same rule as contexts.
 *   ejecta itself may run worker threads inside a call
 *   (ejecta_config.worker_threads); they have finished when the call
 *   returns.
 * - Determinism: records, ledger and gas after ejecta_apply_* are bitwise the
 *   same for any worker_threads, any order of the stars, and (radius mode,
 *   with ghosts covering the coupling radius) any number of MPI ranks. Every
 *   random draw is keyed by what the host states (ejecta_config.seed, the
 *   star ID and the step_index passed to the step), never by the history of
 *   a context, so a run restarted from a checkpoint with a new context, or
 *   a rank that skips a step for want of stars, draws the same numbers.
 * - Bad input (NULL pointers, counts <= 0, strides smaller than the element,
 *   unknown names, NaN values, a destroyed context) is reported with an
 *   error code and never crashes. ejecta cannot check that a pointer points
 *   at as many elements as the caller says: that is the caller's promise.
 */
#ifndef EJECTA_H
#define EJECTA_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Version of this header's binary interface: bumped when a struct layout,
 * a function signature or the meaning of a field changes (functions that
 * are only added do not bump it; ejecta_version gives the library's, to
 * compare with this one). History:
 * 2: ejecta_step takes the host's step_index (as ejecta_step_population
 *    does), which keys every random draw with the seed and the star ID.
 * 3: ejecta_config gains remnant_table.
 * 4: ejecta_record and ejecta_touched gain fuv_field and
 *    hydro_decoupled_until; ejecta_star gains new_stellar_mass and
 *    dispersion; ejecta_ledger gains kick_energy and heat;
 *    ejecta_population_config gains photoelectric_heating.
 * 5: every config field means what it says, zero included (no zero stands
 *    for a default; start from ejecta_config_defaults /
 *    ejecta_population_defaults), and ejecta_config gains photon_reach,
 *    max_infrared_boost and wind_event_energy_erg.
 * 6: ejecta_star_particle gains new_stellar_mass (the wind of the
 *    "-formed-mass" kicked-wind schemes in population steps). */
#define EJECTA_ABI_VERSION 6

/* ---- error codes ---------------------------------------------------- */

/* Success. */
#define EJECTA_OK 0
/* A required pointer argument was NULL. */
#define EJECTA_ERR_NULL_POINTER 1
/* A count, size, stride, element type, species code, mode or other argument
 * is out of range, or the configuration is inconsistent. */
#define EJECTA_ERR_INVALID_ARGUMENT 2
/* A scheme, remnant fit, weighting or IMF name is not known (or empty), or
 * a name field is not NUL-terminated inside its array. */
#define EJECTA_ERR_UNKNOWN_NAME 3
/* The context handle is 0, was destroyed, or is not an ejecta context; or
 * (ejecta_dump_* calls) the dump handle is 0, was closed, or is not a dump
 * session. */
#define EJECTA_ERR_INVALID_CONTEXT 4
/* A step or apply was called before any gas was bound. */
#define EJECTA_ERR_NO_GAS 5
/* A value is NaN, infinite or negative where it must not be (a star, a
 * release, a record, dt), or a species mass exceeds its total. Nothing was
 * changed. */
#define EJECTA_ERR_BAD_VALUE 6
/* The step cannot find each star's gas: host rows malformed (offsets not
 * starting at 0 or decreasing, an index outside the gas, an element twice
 * in a row), in count mode a host row, or with ejecta's own finder the
 * whole bound gas, holding fewer elements than neighbor_count, or gas
 * positions or IDs the tree cannot use (NaN, duplicate IDs). Checked
 * before any star is coupled: nothing was done and the step keeps no
 * records. */
#define EJECTA_ERR_NEIGHBORS 7
/* A caller buffer is too small: a copy call copied the first capacity
 * entries and wrote the number there are to *written (the copy rule
 * above); text was truncated to fit. */
#define EJECTA_ERR_BUFFER_TOO_SMALL 8
/* A record names a gas ID (or index) this context's gas does not hold.
 * Nothing was applied. */
#define EJECTA_ERR_UNKNOWN_GAS 9
/* Another call on the same context is running. Nothing was changed. */
#define EJECTA_ERR_BUSY 10
/* The step completed but the release of at least one star was returned
 * undeposited: no gas within reach (radius mode), or a neighbor with
 * unusable fields (NaN or infinite values, non-positive mass or density,
 * negative internal energy, a metal mass fraction outside [0, 1]; nothing
 * is deposited into such an element), or amounts out of floating-point
 * range. Records and ledger are valid; the ledger's undeposited quantities
 * hold what was returned; ejecta_copy_undeposited names the stars and
 * channels; ejecta_last_error gives their number and the first one's
 * reason. */
#define EJECTA_ERR_UNDEPOSITED 11
/* The ledger does not balance within the tolerance asked for. */
#define EJECTA_ERR_IMBALANCE 12
/* The records of the last step were already applied. */
#define EJECTA_ERR_ALREADY_APPLIED 13
/* ejecta_step_population was called on a context without a population
 * (see ejecta_enable_population). */
#define EJECTA_ERR_NO_POPULATION 14
/* The yields table named in ejecta_population_config could not be read or
 * is malformed; ejecta_last_error names the file and the line. */
#define EJECTA_ERR_YIELDS_TABLE 15
/* config.remnant_table could not be read or is malformed; the message
 * names the file and the line. */
#define EJECTA_ERR_REMNANT_TABLE 16
/* An audit dump's directory or one of its files could not be created or
 * written (ejecta_dump_*); the message names the path and the reason. */
#define EJECTA_ERR_DUMP_FILE 17
/* An internal failure: a panic in the library or in a scheme, or a fault
 * reading or writing host memory through a bad column pointer, in the
 * calling thread or in any of ejecta's worker threads. It never ends the
 * process: the call was abandoned, nothing was deposited or applied, and
 * the step keeps no records. The message says what happened; destroy the
 * context. */
#define EJECTA_ERR_INTERNAL 99

/* ---- enumerations ---------------------------------------------------- */

/* Element types of a gas column (ejecta_field.type). */
#define EJECTA_FLOAT64 1
#define EJECTA_FLOAT32 2
#define EJECTA_INT64 3
#define EJECTA_INT32 4

/* Species codes: index into every species_mass array, and values for the
 * species list of ejecta_gas. EJECTA_SPECIES_METALS (0) is always the
 * total metal mass (everything heavier than helium); codes 1, 2, ... are
 * the elements of the context's species set, in its order. Which elements
 * are tracked is the host's choice (ejecta_choose_species, up to
 * EJECTA_NUM_SPECIES - 1 elements by chemical symbol); the codes below are
 * those of the default set, H, He, C, N, O, Ne, Mg, Si, S, Ca, Fe: the
 * elements that dominate radiative cooling (Wiersma, Schaye & Smith 2009,
 * MNRAS 393, 99). ejecta_species_symbol names the codes of any set. */
#define EJECTA_SPECIES_METALS 0
#define EJECTA_SPECIES_HYDROGEN 1
#define EJECTA_SPECIES_HELIUM 2
#define EJECTA_SPECIES_CARBON 3
#define EJECTA_SPECIES_NITROGEN 4
#define EJECTA_SPECIES_OXYGEN 5
#define EJECTA_SPECIES_NEON 6
#define EJECTA_SPECIES_MAGNESIUM 7
#define EJECTA_SPECIES_SILICON 8
#define EJECTA_SPECIES_SULFUR 9
#define EJECTA_SPECIES_CALCIUM 10
#define EJECTA_SPECIES_IRON 11
#define EJECTA_NUM_SPECIES 12 /* the room in every species_mass array */

/* Release channels (ejecta_star.channel, ejecta_record.channel). */
#define EJECTA_CHANNEL_CORE_COLLAPSE 0
#define EJECTA_CHANNEL_TYPE_IA 1
#define EJECTA_CHANNEL_MASSIVE_WINDS 2
#define EJECTA_CHANNEL_AGB_WINDS 3
/* Channels only a population step drives (ejecta_record.channel,
 * ejecta_get_channel_ledger); not accepted in ejecta_star.channel. */
#define EJECTA_CHANNEL_RADIATION_PRESSURE 4
#define EJECTA_CHANNEL_PHOTOIONIZATION 5
#define EJECTA_CHANNEL_PHOTOELECTRIC_HEATING 6
/* Number of channels a population step drives (0..6 above). */
#define EJECTA_NUM_STEP_CHANNELS 7

/* Where a step finds each star's gas (ejecta_step's neighbor_mode). */
/* ejecta's own k-d tree, built on the bound gas positions. */
#define EJECTA_NEIGHBORS_OWN_FINDER 0
/* The host's compressed rows: the candidates of star s are
 * row_indices[row_offsets[s] .. row_offsets[s+1]-1], 0-based gas indices. */
#define EJECTA_NEIGHBORS_HOST_ROWS 1

/* How ejecta_apply_records finds each record's gas element. */
/* By ejecta_record.gas_index (records made by this context's last step). */
#define EJECTA_LOCATE_BY_INDEX 0
/* By ejecta_record.gas_id: records made on another rank, where the element
 * was a ghost. */
#define EJECTA_LOCATE_BY_ID 1

/* Bits of ejecta_record.flags. */
/* The element's momentum was capped at its share of the terminal momentum
 * (cooling radius unresolved). */
#define EJECTA_FLAG_CAPPED 1u
/* The star's kicks were scaled down so that no element's heat went
 * negative. */
#define EJECTA_FLAG_LIMITED 2u
/* The element is photoionized. */
#define EJECTA_FLAG_IONIZED 4u
/* The host should hold cooling for the element until
 * hold_cooling_until (code time from the step start). */
#define EJECTA_FLAG_HOLD_COOLING 8u
/* The element was chosen by stochastic heating. */
#define EJECTA_FLAG_STOCHASTIC 16u
/* The element was launched into a kicked wind: the host should leave it
 * out of hydrodynamic forces (pressure and viscosity, both ways) until
 * hydro_decoupled_until (code time from the step start). */
#define EJECTA_FLAG_HYDRO_DECOUPLED 32u

/* Sizes of the name arrays in ejecta_config. */
#define EJECTA_NAME_CAPACITY 48

/* ---- types ------------------------------------------------------------ */

/* An opaque context handle. 0 is never a valid context. Copying the value
 * does not copy the context. */
typedef uint64_t ejecta_context;

/* Everything a context is created with. Fill it with ejecta_config_defaults
 * first, then change what you need: every field is used as it is (the
 * defaults named below are what ejecta_config_defaults writes). */
typedef struct ejecta_config {
  /* Code units: cm, g and cm/s per code unit of length, mass and velocity.
   * Finite and positive. Default 1, 1, 1 (cgs). */
  double length_cm;
  double mass_g;
  double velocity_cm_per_s;
  /* Kinetic scheme: fraction of the energy handed out as radial kinetic
   * energy, in [0, 1]; 0 gives no kinetic energy (all heat). Default the
   * Sedov-Taylor value 0.28. Ignored by the other schemes. */
  double kinetic_fraction;
  /* Radius mode: when > 0, each star couples to every gas element within
   * this distance (code length), and neighbor_count is ignored. With
   * host rows, the members of the row within the radius. 0 (default):
   * count mode. */
  double coupling_radius;
  /* Periodic box side per axis (code length); 0 leaves the axis open
   * (default). */
  double box_size[3];
  /* Seed of the counter-based random streams: the draws of stochastic
   * schemes (stochastic-heating) and the supernovae of population steps.
   * Every draw is keyed by (seed, star ID, the step_index the host passes
   * to the step), never by how many calls a context has run, so a
   * restarted context, or a rank that skipped a step because it had no
   * stars, draws the same numbers for a star as one that ran through.
   * Default 0. */
  uint64_t seed;
  /* Count mode: each star couples to its neighbor_count nearest gas
   * elements (host rows: nearest of its row, which must be at least that
   * long). At least 1 (also in radius mode, where it is not used).
   * Default 32. */
  int32_t neighbor_count;
  /* Threads ejecta uses inside a step, 1 to 4096. Default 1. Results do
   * not depend on it. */
  int32_t worker_threads;
  /* 1: apply the isotropy correction to weights and momenta (default);
   * 0: do not (for comparisons). */
  int32_t isotropy_correction;
  /* Photoionization (the scheme, and the channel of population steps):
   * while a star's ionizing photons are more than its nearest gas can
   * absorb, ejecta's own finder searches further out, nearest first,
   * until they are absorbed, up to photon_reach elements in all, so the
   * ionized mass reaches the Stromgren mass however finely the gas is
   * resolved (with host rows the search ends with the row). Photons the
   * reached gas cannot absorb are returned as escaped. 0 (default), or a
   * value not above the neighbors a star couples to, keeps the photons to
   * those neighbors. With growth the result depends on the gas a rank
   * holds: an MPI host must hold ghost gas out to the Stromgren radius
   * for results to be the same on any number of ranks. >= 0. */
  int32_t photon_reach;
  /* NUL-terminated names: scheme "thermal-dump", "kinetic",
   * "terminal-momentum", "stochastic-heating", "delayed-cooling" (a
   * thermal dump whose records ask the host to hold cooling),
   * "stellar-winds", "radiation-pressure", "photoionization",
   * "photoelectric-heating" (a star's energy is its far-ultraviolet light
   * over duration; records carry fuv_field), "kicked-winds" (decoupled
   * winds of 484 km/s loading 2 Msun per 1e49 erg of supernova energy,
   * paid from the star's energy; records flag EJECTA_FLAG_HYDRO_DECOUPLED),
   * "kicked-winds-momentum-driven" (speed and loading from the star's
   * dispersion, or the gas's when 0), and either with "-formed-mass"
   * appended (loading 2 times the star's new_stellar_mass, in population
   * steps the star particle's); remnant_fit
   * (terminal-momentum and stellar-winds)
   * "kim-ostriker-2015" or "cioffi-mckee-bertschinger-1988"; weighting
   * "kernel-volume" or "solid-angle". Every name must be given (an empty
   * name is unknown). Defaults terminal-momentum, kim-ostriker-2015,
   * kernel-volume. The remnant fit (or remnant_table) is also that of the
   * winds of population steps. */
  char scheme[EJECTA_NAME_CAPACITY];
  char remnant_fit[EJECTA_NAME_CAPACITY];
  char weighting[EJECTA_NAME_CAPACITY];
  /* Path of a remnant table (the CSV format of feedback.RemnantTable, e.g.
   * written by "ejecta remnant -calibrate" for the host's own cooling),
   * NUL-terminated, at most 4095 bytes; NULL or "" for none. When set, the
   * terminal-momentum and stellar-winds schemes take the remnant from it
   * instead of remnant_fit. Gas outside the table's grid returns the
   * star's release undeposited (EJECTA_ERR_UNDEPOSITED). Read once, at
   * ejecta_create; errors: EJECTA_ERR_REMNANT_TABLE. Default NULL. */
  const char *remnant_table;
  /* Radiation pressure (the scheme, and the channel of population steps):
   * the bound on the infrared trapping factor 1 + tau_IR that boosts the
   * momentum of the absorbed light beyond L/c (radiation-hydrodynamic
   * studies find at most a few times L/c). At least 1 (1: no infrared
   * boost); INFINITY leaves it unbounded. Default 3. */
  double max_infrared_boost;
  /* Stellar winds (the scheme, and the wind channels of population
   * steps): the energy of one remnant the wind energy is counted in, in
   * erg whatever the code units; the wind couples as energy/this many
   * remnants of the remnant fit or table. Finite and > 0. Default 1e51
   * (one supernova's). */
  double wind_event_energy_erg;
} ejecta_config;

/* One column of the host's gas: element i is at byte address
 * data + i*stride, of the given element type. A field of an array of
 * structs is {&parts[0].field, sizeof(parts[0]), type}. */
typedef struct ejecta_field {
  void *data;
  /* Bytes between consecutive elements; at least the element size and a
   * multiple of it. */
  int64_t stride;
  /* EJECTA_FLOAT64, EJECTA_FLOAT32, EJECTA_INT64 or EJECTA_INT32. Columns
   * ejecta writes (velocity, mass, internal energy, species fractions) must
   * be float32 or float64. */
  int32_t type;
  int32_t reserved;
} ejecta_field;

/* The host's gas, column by column, in code units. position, density,
 * smoothing_length and id are read only; velocity, mass, internal_energy
 * and species_fraction are written by the ejecta_apply_* calls. Columns
 * written must not overlap other columns in memory. */
typedef struct ejecta_gas {
  /* Number of elements, > 0. */
  int64_t count;
  ejecta_field position[3];
  ejecta_field velocity[3];
  ejecta_field mass;
  ejecta_field density;
  /* Specific internal energy (energy per mass). */
  ejecta_field internal_energy;
  /* Optional: data NULL when the host has none. */
  ejecta_field smoothing_length;
  /* Unique element IDs; they order the application of records. */
  ejecta_field id;
  /* Number of tracked species (0..EJECTA_NUM_SPECIES); species[k] is the
   * EJECTA_SPECIES_* code of species_fraction[k], a mass-fraction column.
   * If EJECTA_SPECIES_METALS is tracked, it is also the metallicity the
   * remnant fits see. May be NULL when n_species is 0. */
  int32_t n_species;
  int32_t reserved;
  const int32_t *species;
  const ejecta_field *species_fraction;
} ejecta_gas;

/* One star and what it releases this step (star's rest frame). */
typedef struct ejecta_star {
  /* Unique among the stars of a step (and across ranks): orders records. */
  int64_t id;
  /* Code length and velocity; finite. */
  double position[3];
  double velocity[3];
  /* Stellar mass (code mass), >= 0. */
  double mass;
  /* Metal mass fraction, in [0, 1). */
  double metallicity;
  /* Code time since formation, >= 0. */
  double age;
  /* EJECTA_CHANNEL_CORE_COLLAPSE .. EJECTA_CHANNEL_AGB_WINDS. */
  int32_t channel;
  int32_t reserved;
  /* Release: ejected mass, its species masses by species code
   * (species_mass[s] <= ejected_mass; 0 at codes past the context's set),
   * energy (explosion energy, wind kinetic energy, emitted
   * light for radiation pressure), number of discrete events (supernovae;
   * 0 for continuous release), hydrogen-ionizing photons emitted over the
   * step and the step's duration (code time; both used by
   * photoionization, duration also by photoelectric-heating, 0
   * otherwise). All finite and >= 0. */
  double ejected_mass;
  double species_mass[EJECTA_NUM_SPECIES];
  double energy;
  double events;
  double photons;
  double duration;
  /* Kicked winds: the stellar mass the star formed this step (code mass;
   * used by schemes that load their wind per formed mass, 0 otherwise),
   * and the one-dimensional velocity dispersion of its galaxy (code
   * velocity; 0 lets kicked-winds-momentum-driven measure the gas's). */
  double new_stellar_mass;
  double dispersion;
} ejecta_star;

/* One star's deposit into one gas element. */
typedef struct ejecta_record {
  /* Index of the element in the gas bound when the step ran. */
  int64_t gas_index;
  int64_t gas_id;
  int64_t star_id;
  int32_t channel;
  uint32_t flags; /* EJECTA_FLAG_* bits */
  /* Mass added (code mass), and of it the mass of each species, indexed
   * by species code (entries past the context's set are 0). */
  double mass;
  double species_mass[EJECTA_NUM_SPECIES];
  /* Lab-frame momentum added. */
  double momentum[3];
  /* Change of the element's total (thermal + lab-frame kinetic) energy. */
  double energy;
  /* Thermal part of energy. */
  double heat;
  /* Energy booked as radiated on the element's behalf. */
  double radiated;
  /* With EJECTA_FLAG_HOLD_COOLING: code time from the step start. */
  double hold_cooling_until;
  /* Speed change this deposit alone gives the element, and its heat per
   * unit mass (timestep help). */
  double kick;
  double heating;
  /* With EJECTA_FLAG_HYDRO_DECOUPLED: code time from the step start. */
  double hydro_decoupled_until;
  /* Far-ultraviolet field (6-13.6 eV) the star makes at the element, in
   * Habing units G0 (photoelectric heating; 0 otherwise), for hosts with
   * their own cooling or chemistry. */
  double fuv_field;
} ejecta_record;

/* An amount of every conserved quantity, code units: mass, mass per
 * species (indexed by EJECTA_SPECIES_*), lab-frame momentum, total energy
 * (thermal plus lab-frame kinetic). */
typedef struct ejecta_quantities {
  double mass;
  double species_mass[EJECTA_NUM_SPECIES];
  double momentum[3];
  double energy;
} ejecta_quantities;

/* The account of one step: released = deposited + undeposited, and for
 * energy released = deposited + radiated + undeposited, to round-off. */
typedef struct ejecta_ledger {
  /* What the stars released, lab frame (ejecta carry the star's velocity). */
  ejecta_quantities released;
  /* What the records carry into the gas. */
  ejecta_quantities deposited;
  /* What was returned to the caller (stars with no gas, bad neighbors). */
  ejecta_quantities undeposited;
  /* Energy booked as radiated by unresolved remnants. */
  double radiated;
  /* Stars handled; of those, returned undeposited; with a neighbor capped
   * at the terminal momentum; with kicks scaled down. */
  int64_t stars;
  int64_t skipped;
  int64_t capped;
  int64_t limited;
  /* Isotropy residual |sum p_j| / sum |p_j| before the net momentum was
   * removed: the largest over stars, and the sum (for means). */
  double max_isotropy_residual;
  double sum_isotropy_residual;
  /* Radial momentum handed out, star frame. */
  double radial_momentum;
  /* Round-off scales: sum of |kick| over records, and the kinetic energy
   * of the touched gas plus what was released. */
  double momentum_scale;
  double energy_scale;
  /* The deposited energy as the schemes split it: kinetic energy the gas
   * gained in each star's frame (what kicks used of the release, e.g. a
   * kicked wind's share of the supernova energy), and heat. */
  double kick_energy;
  double heat;
} ejecta_ledger;

/* What an ejecta_apply_* call did. */
typedef struct ejecta_apply_report {
  /* Records applied, and gas elements they changed. */
  int64_t records;
  int64_t elements;
  /* What the gas gained, summed from the records (plus reclaimed and
   * shortfall energy). */
  ejecta_quantities deposited;
  /* Radiated energy taken back into the gas where kicks of several stars
   * added up coherently on one element. */
  double reclaimed;
  /* Energy the gas received beyond what records and reclaimed energy
   * carried (an element's heat would have gone negative); the balance of
   * a step is released + shortfall = gas gain + (radiated - reclaimed) +
   * undeposited. shortfall_elements counts the elements concerned. */
  double shortfall;
  int64_t shortfall_elements;
} ejecta_apply_report;

/* Timestep help for one element that received records in the last apply:
 * the largest speed change and heating per unit mass any single record gave
 * it, the latest hold times, the summed far-ultraviolet field of the stars
 * that lit it (G0), and the union of the flags. */
typedef struct ejecta_touched {
  int64_t gas_index;
  int64_t gas_id;
  double max_kick;
  double max_heating;
  double hold_cooling_until;
  double hydro_decoupled_until;
  double fuv_field;
  uint32_t flags;
  int32_t reserved;
} ejecta_touched;

/* ---- population steps --------------------------------------------------
 *
 * With a population enabled on a context (ejecta_enable_population), the
 * host hands ejecta only its star particles and the step length; ejecta
 * works out what each star releases over [age, age + dt] from a stellar
 * population model (core-collapse and Type Ia supernovae drawn as whole
 * events, winds, radiation pressure, photoionization, photoelectric
 * heating), couples every
 * channel and keeps records and ledger exactly as ejecta_step does.
 *
 * The population has its own struct and call rather than fields of
 * ejecta_config: a context without a population behaves exactly as
 * before, and a host that wants population steps adds one call after
 * ejecta_create. The scheme, remnant fit, weighting, neighbors, units,
 * box, workers and seed of the context's ejecta_config apply: the scheme
 * couples the supernovae; winds use remnant_fit (or remnant_table) and
 * wind_event_energy_erg, radiation pressure max_infrared_boost and
 * photoionization photon_reach, as the schemes of those names do;
 * photoelectric heating its built-in scheme. */

/* A stellar population model. Fill it with ejecta_population_defaults
 * first, then change what you need: every field is used as it is (the
 * defaults named below are what ejecta_population_defaults writes). */
typedef struct ejecta_population_config {
  /* NUL-terminated initial mass function of the built-in population:
   * "salpeter" (Salpeter 1955), "kroupa" (Kroupa 2001) or "chabrier"
   * (Chabrier 2003). Default kroupa. */
  char imf[EJECTA_NAME_CAPACITY];
  /* IMF mass range in Msun (whatever the code units): finite,
   * 0 < lightest < heaviest. Default 0.1 and 100. */
  double lightest_star_mass;
  double heaviest_star_mass;
  /* A step in which some star expects more supernovae than this makes
   * ejecta_suggested_step report a smaller step: > 0, INFINITY never
   * suggests one. Default 10. */
  double max_supernovae_per_step;
  /* NULL or "": the built-in population above. Otherwise the path of a
   * yields table in ejecta's CSV format (testdata/yields/README.md; at
   * most 4095 bytes, NUL-terminated), read once by
   * ejecta_enable_population; the table replaces the built-in population,
   * so the IMF fields are then only checked, not used. Default NULL. */
  const char *yields_table;
  /* Channel switches, 1 on and 0 off: stellar winds (massive and AGB; off
   * also keeps their mass on the star), radiation pressure,
   * photoionization. Defaults 1. */
  int32_t winds;
  int32_t radiation_pressure;
  int32_t photoionization;
  /* 1: flag the gas touched by supernovae to have its cooling switched off
   * for the blast-wave time (EJECTA_FLAG_HOLD_COOLING with
   * hold_cooling_until in the records and ejecta_touched). Default 0. */
  int32_t delayed_cooling;
  /* Photoelectric heating by the population's far-ultraviolet light
   * (EJECTA_CHANNEL_PHOTOELECTRIC_HEATING; records carry fuv_field), 1 on
   * and 0 off. Default 1. */
  int32_t photoelectric_heating;
  int32_t reserved;
} ejecta_population_config;

/* One star particle as a population step sees it, code units. */
typedef struct ejecta_star_particle {
  /* Unique among the stars of a step (and across ranks): orders records
   * and keys the supernova draws. */
  int64_t id;
  double position[3];
  double velocity[3];
  /* Current mass (after earlier mass loss), >= 0. */
  double mass;
  /* Stellar mass the particle formed with, >= 0: releases scale with it. */
  double formed_mass;
  /* Metal mass fraction, in [0, 1). */
  double metallicity;
  /* Code time since formation at the start of the step, >= 0. */
  double age;
  /* Energy returned undeposited by earlier steps (the carried_energy of
   * ejecta_star_result; 0 at formation), >= 0. It is added to this step's
   * core-collapse energy. */
  double carried_energy;
  /* Stellar mass the particle formed during this step (code mass), >= 0;
   * 0 when it forms none. The "-formed-mass" kicked-wind schemes load
   * their wind on it (2 times new_stellar_mass), paid from this step's
   * core-collapse energy: a particle that forms stars over many steps
   * passes what each step formed, and its older stars' supernovae launch
   * the wind (a particle born in one burst has no supernova energy in its
   * first step: its wind is slowed to what the energy pays, and
   * "kicked-winds" suits it). Other schemes ignore it. */
  double new_stellar_mass;
} ejecta_star_particle;

/* What one star did in the last population step. */
typedef struct ejecta_star_result {
  int64_t id;
  /* Mass the star released and ejecta deposited this step (code mass):
   * take it off the star particle's mass. */
  double mass_loss;
  /* Energy returned undeposited this step (code energy): pass it back as
   * ejecta_star_particle.carried_energy next step. */
  double carried_energy;
  /* Supernovae drawn this step: core collapse and Type Ia. */
  int64_t supernovae_cc;
  int64_t supernovae_ia;
} ejecta_star_result;

/* ---- audit dumps ---------------------------------------------------------
 *
 * A host that injects feedback with its own code (no ejecta step needed)
 * writes one step for the conservation audit ("ejecta audit -manifest
 * DIR/manifest.json", or package feedback/audit) through a dump session:
 *
 *   ejecta_dump d;
 *   ejecta_dump_open("dump/step42", NULL, box_size, &d, why, sizeof why);
 *   ejecta_dump_gas_before(d, &gas);    the same ejecta_gas it binds with
 *   ... the host's own feedback sub-step, changing the gas in place ...
 *   ejecta_dump_gas_after(d, &gas);
 *   ejecta_dump_stars(d, &stars);       each star's release (any number of
 *                                       calls; count 0 for none)
 *   ejecta_dump_finish(d);              writes the manifest
 *   ejecta_dump_close(&d);
 *
 * The calls only read the host's memory and write files: every snapshot is
 * written when it is taken (the host may change its gas as soon as the call
 * returns), and ejecta keeps no pointer. The directory then holds NumPy
 * .npy arrays (gas_before/, gas_after/, stars/) and manifest.json, the
 * layout documented in cgo/README.md and "go doc ./feedback/audit
 * Manifest", in the host's code units. A dump session is used by one
 * thread at a time (a concurrent call returns EJECTA_ERR_BUSY); separate
 * sessions are independent. ejecta_dump_last_error gives the reason of a
 * failed call on a session. */

/* An opaque dump session handle. 0 is never a valid session. */
typedef uint64_t ejecta_dump;

/* The stars of a step, column by column (as ejecta_gas describes gas),
 * with what each released into the gas, in code units. position,
 * velocity and every release column are required except radiated. */
typedef struct ejecta_star_columns {
  /* Number of stars, >= 0. */
  int64_t count;
  /* Star IDs (integer columns, or integral floats). */
  ejecta_field id;
  ejecta_field position[3];
  ejecta_field velocity[3];
  /* How far the star's feedback reaches: gas farther than this from the
   * star must not change (code length, >= 0). */
  ejecta_field coupling_radius;
  /* Mass released into the gas (>= 0); it moves with the star, so it
   * brings the momentum ejecta_mass * velocity. */
  ejecta_field ejecta_mass;
  /* Energy released in the star's frame (explosion, wind, heat; >= 0): the
   * gas's total energy (thermal plus lab-frame kinetic) must grow by
   * energy + ejecta_mass * |velocity|^2 / 2 - radiated. */
  ejecta_field energy;
  /* Optional (data NULL: none): energy the host booked as radiated away
   * (>= 0). */
  ejecta_field radiated;
  /* Number of species released (0..EJECTA_NUM_SPECIES): species[k] is the
   * species code (of the dump's set, see ejecta_dump_open) of
   * species_mass[k], a column of released species mass (>= 0). A species
   * the gas tracks and no star lists counts as released zero. May be NULL
   * when n_species is 0. */
  int32_t n_species;
  int32_t reserved;
  const int32_t *species;
  const ejecta_field *species_mass;
} ejecta_star_columns;

#ifndef EJECTA_NO_PROTOTYPES

/* ---- library ---------------------------------------------------------- */

/* ejecta_version writes the library version ("MAJOR.MINOR.PATCH") as a
 * NUL-terminated string into buffer (capacity bytes) and, when abi_version
 * is not NULL, the library's EJECTA_ABI_VERSION (compare it with the
 * header's). Errors: EJECTA_ERR_NULL_POINTER (buffer NULL),
 * EJECTA_ERR_BUFFER_TOO_SMALL (the version is truncated to capacity-1
 * bytes; capacity 0 writes nothing). Thread safe. */
int ejecta_version(char *buffer, int64_t capacity, int32_t *abi_version);

/* ejecta_config_defaults fills every field of *config with the library's
 * defaults: cgs code units (1, 1, 1), scheme "terminal-momentum" with
 * "kim-ostriker-2015", no remnant table, weighting "kernel-volume",
 * isotropy correction on, 32 neighbors, no coupling radius, open box,
 * seed 0, one worker, kinetic fraction 0.28, no photon reach, infrared
 * boost bound 3, wind event energy 1e51 erg. Errors:
 * EJECTA_ERR_NULL_POINTER. Thread safe. */
int ejecta_config_defaults(ejecta_config *config);

/* ---- context ---------------------------------------------------------- */

/* ejecta_create checks *config and creates a context, written to *context
 * (0 on failure). The config is copied; the caller keeps ownership.
 * On failure a NUL-terminated reason is written to error_text (capacity
 * bytes, truncated to fit; error_text may be NULL when capacity is 0),
 * since there is no context to ask. Errors: EJECTA_ERR_NULL_POINTER
 * (config or context NULL), EJECTA_ERR_INVALID_ARGUMENT (units not finite
 * and positive, neighbor_count below 1, negative or NaN radius, NaN or
 * negative box, worker_threads outside 1..4096, kinetic_fraction outside
 * [0, 1], isotropy_correction not 0 or 1, photon_reach negative,
 * max_infrared_boost below 1 or NaN, wind_event_energy_erg not finite and
 * positive), EJECTA_ERR_UNKNOWN_NAME (a name unknown, empty or not
 * NUL-terminated),
 * EJECTA_ERR_REMNANT_TABLE (remnant_table unreadable or malformed). Thread
 * safe. */
int ejecta_create(const ejecta_config *config, ejecta_context *context,
                  char *error_text, int64_t capacity);

/* ejecta_destroy frees the context *context and sets *context to 0. The
 * bound gas is not touched. Destroying 0 is a no-op returning EJECTA_OK;
 * destroying a context already destroyed (through another copy of the
 * handle) returns EJECTA_ERR_INVALID_CONTEXT. Errors:
 * EJECTA_ERR_NULL_POINTER, EJECTA_ERR_INVALID_CONTEXT, EJECTA_ERR_BUSY. */
int ejecta_destroy(ejecta_context *context);

/* ejecta_last_error writes the message of the last failed call on the
 * context (empty after a success) into buffer (capacity bytes,
 * NUL-terminated, truncated to fit) and its full length in bytes, without
 * the NUL, into *length when length is not NULL. For an invalid context it
 * writes a message saying so and returns EJECTA_ERR_INVALID_CONTEXT; while
 * another call runs on the context it writes a message saying that and
 * returns EJECTA_ERR_BUSY. Errors: EJECTA_ERR_NULL_POINTER (buffer NULL
 * with capacity > 0), EJECTA_ERR_INVALID_CONTEXT, EJECTA_ERR_BUSY,
 * EJECTA_ERR_BUFFER_TOO_SMALL (truncated; *length is the full length). */
int ejecta_last_error(ejecta_context context, char *buffer, int64_t capacity,
                      int64_t *length);

/* ---- gas -------------------------------------------------------------- */

/* ejecta_bind_gas points the context at the host's gas. The descriptor and
 * the species list are copied; the column memory is not: it must stay valid
 * until the next ejecta_bind_gas or ejecta_destroy, and the host must not
 * change it during a call on this context. Positions and IDs are read at
 * the first step with EJECTA_NEIGHBORS_OWN_FINDER after binding (to build
 * the tree), and IDs at the first ejecta_apply_records with
 * EJECTA_LOCATE_BY_ID (to index them): bind again after moving the gas or
 * renumbering it. Other fields are read at each call.
 * Errors: EJECTA_ERR_NULL_POINTER (gas, a required column's data, species
 * lists with n_species > 0), EJECTA_ERR_INVALID_ARGUMENT (count <= 0,
 * unknown element type, stride smaller than or not a multiple of the
 * element, misaligned data, integer type in a written column, species code
 * unknown or repeated, n_species outside 0..EJECTA_NUM_SPECIES, written
 * columns overlapping others). On error the previous binding is
 * dropped. */
int ejecta_bind_gas(ejecta_context context, const ejecta_gas *gas);

/* ---- step ------------------------------------------------------------- */

/* ejecta_step couples the release of n_stars stars into the bound gas and
 * keeps the records and the ledger in the context (read them with
 * ejecta_record_count / ejecta_copy_records / ejecta_get_ledger, apply them
 * with ejecta_apply_step_records or ejecta_apply_records). The gas is not
 * changed. Stars are copied; all are checked before anything is done.
 * step_index (>= 0) is the host's step number: with the seed and the star
 * ID it keys every random draw of the step (stochastic heating), so the
 * records depend only on what the host states. Pass the same index for
 * the same step on every rank and after a restart from a checkpoint; a
 * rank without stars skips the call and changes nothing.
 * neighbor_mode is EJECTA_NEIGHBORS_OWN_FINDER (row_offsets and
 * row_indices ignored, may be NULL) or EJECTA_NEIGHBORS_HOST_ROWS:
 * row_offsets has n_stars+1 non-decreasing entries starting at 0 and
 * row_indices has row_offsets[n_stars] 0-based gas indices, no row naming
 * an element twice. Errors: EJECTA_ERR_NULL_POINTER,
 * EJECTA_ERR_INVALID_ARGUMENT (n_stars <= 0, step_index < 0, unknown
 * mode or channel, duplicate star IDs),
 * EJECTA_ERR_BAD_VALUE (NaN, infinite or negative star or release field,
 * metallicity >= 1, a species mass above the ejected mass or at a code
 * past the context's species set; nothing is done),
 * EJECTA_ERR_NO_GAS, EJECTA_ERR_NEIGHBORS (malformed rows, a row or the
 * whole gas shorter than neighbor_count in count mode, gas positions or
 * IDs unusable for the tree: NaN, duplicate IDs; nothing is done),
 * EJECTA_ERR_UNDEPOSITED (completed, some releases returned: see above),
 * EJECTA_ERR_INTERNAL (a panic or a fault on a bad column in any worker:
 * see above). */
int ejecta_step(ejecta_context context, const ejecta_star *stars,
                int64_t n_stars, int64_t step_index, int32_t neighbor_mode,
                const int64_t *row_offsets, const int64_t *row_indices);

/* ejecta_record_count writes the number of records of the last step to
 * *count. Errors: EJECTA_ERR_NULL_POINTER, EJECTA_ERR_INVALID_CONTEXT. */
int ejecta_record_count(ejecta_context context, int64_t *count);

/* ejecta_copy_records copies the records of the last step, grouped by star
 * in the order the stars were given (after a population step: by channel,
 * in the order core collapse, Type Ia, massive winds, AGB winds,
 * photoionization, photoelectric heating, radiation pressure, then by
 * star; applying them does not reorder them), into records
 * (capacity entries), with the copy rule above: *written is the number of
 * records (as ejecta_record_count gives). Errors: EJECTA_ERR_NULL_POINTER
 * (written NULL, or records NULL with capacity > 0),
 * EJECTA_ERR_INVALID_ARGUMENT (capacity < 0), EJECTA_ERR_BUFFER_TOO_SMALL
 * (the first capacity records were copied). */
int ejecta_copy_records(ejecta_context context, ejecta_record *records,
                        int64_t capacity, int64_t *written);

/* ejecta_copy_undeposited lists the releases of the last step (either kind
 * of step) that were returned undeposited — no gas in reach, a neighbor
 * with unusable fields, a malformed release — so the host can keep them:
 * the star's ID into star_ids[k] and the release's EJECTA_CHANNEL_* into
 * channels[k] (channels may be NULL), for at most capacity entries, in the
 * order the stars were given (a star appears once per channel returned),
 * with the copy rule above: *written is the number of releases returned.
 * The ledger's undeposited amounts are their sum, and the ledger's skipped
 * count (ejecta_get_ledger) is their number too. Errors:
 * EJECTA_ERR_NULL_POINTER (written NULL, or star_ids NULL with
 * capacity > 0), EJECTA_ERR_INVALID_ARGUMENT (capacity < 0),
 * EJECTA_ERR_BUFFER_TOO_SMALL (the first capacity entries were
 * copied). */
int ejecta_copy_undeposited(ejecta_context context, int64_t *star_ids,
                            int32_t *channels, int64_t capacity,
                            int64_t *written);

/* ejecta_get_ledger copies the ledger of the last step into *ledger (all
 * zero before the first step). Errors: EJECTA_ERR_NULL_POINTER,
 * EJECTA_ERR_INVALID_CONTEXT. */
int ejecta_get_ledger(ejecta_context context, ejecta_ledger *ledger);

/* ---- apply ------------------------------------------------------------ */

/* ejecta_apply_step_records applies all records of the last step to the
 * bound gas in place (records of ghost elements included: a host that
 * sends ghost records to their owners uses ejecta_apply_records instead).
 * Each element's records are summed in the order gas ID, star ID, channel,
 * so the result does not depend on thread count or star order. The report
 * goes to *report when report is not NULL. Errors: EJECTA_ERR_NO_GAS,
 * EJECTA_ERR_INVALID_ARGUMENT (no step has run on the bound gas, or its
 * step failed), EJECTA_ERR_ALREADY_APPLIED (called twice for one step),
 * EJECTA_ERR_UNKNOWN_GAS (an index or ID no longer matches the gas;
 * nothing applied). */
int ejecta_apply_step_records(ejecta_context context,
                              ejecta_apply_report *report);

/* ejecta_apply_records applies n_records caller records to the bound gas in
 * place, in the same fixed order as ejecta_apply_step_records: records of
 * this rank's step for its own elements together with records received
 * from other ranks. locate is EJECTA_LOCATE_BY_INDEX (gas_index is used and
 * must hold gas_id) or EJECTA_LOCATE_BY_ID (gas_index is ignored; each
 * gas_id is looked up in the bound gas). The records are copied, not
 * changed. All records are checked before anything is written. n_records
 * may be 0 (nothing to apply). Errors: EJECTA_ERR_NULL_POINTER (records
 * NULL with n_records > 0), EJECTA_ERR_INVALID_ARGUMENT (n_records < 0,
 * unknown locate, two records for one element from the same star and
 * channel, or gas IDs of the bound gas not unique when locating by ID),
 * EJECTA_ERR_NO_GAS, EJECTA_ERR_UNKNOWN_GAS, EJECTA_ERR_BAD_VALUE
 * (non-finite value, negative mass or radiated energy, species mass
 * outside [0, the record's mass]). Nothing is applied on error. */
int ejecta_apply_records(ejecta_context context, const ejecta_record *records,
                         int64_t n_records, int32_t locate,
                         ejecta_apply_report *report);

/* ejecta_copy_touched copies the timestep help of the last apply (one entry
 * per element that received records, in gas-ID order) into touched
 * (capacity entries), with the copy rule above: *written is the number of
 * elements touched. Errors: EJECTA_ERR_NULL_POINTER (written NULL, or
 * touched NULL with capacity > 0), EJECTA_ERR_INVALID_ARGUMENT
 * (capacity < 0), EJECTA_ERR_BUFFER_TOO_SMALL (the first capacity entries
 * were copied). */
int ejecta_copy_touched(ejecta_context context, ejecta_touched *touched,
                        int64_t capacity, int64_t *written);

/* ---- population steps ------------------------------------------------- */

/* ejecta_population_defaults fills every field of *config with the
 * library's defaults: the built-in Kroupa population over 0.1-100 Msun
 * (yields_table NULL), 10 supernovae per step before a smaller step is
 * suggested, winds, radiation pressure, photoionization and photoelectric
 * heating on, delayed cooling off. Errors: EJECTA_ERR_NULL_POINTER.
 * Thread safe. */
int ejecta_population_defaults(ejecta_population_config *config);

/* ejecta_enable_population checks *config, builds the population model
 * (reading the yields table, if one is named) and makes it the model of
 * the context's population steps, replacing any earlier one. The config
 * and the path are copied; ejecta keeps no pointer. The model is built
 * once here (a few tens of milliseconds for the built-in population).
 * Errors: EJECTA_ERR_NULL_POINTER, EJECTA_ERR_UNKNOWN_NAME (IMF name
 * unknown, empty or not NUL-terminated), EJECTA_ERR_INVALID_ARGUMENT (IMF
 * range not finite, not positive or not increasing,
 * max_supernovae_per_step 0, negative or NaN, a switch not 0 or 1, a path
 * not NUL-terminated within 4096 bytes, a yields table that lacks an
 * element of the context's species set, or carries elements outside the
 * default set when none was chosen),
 * EJECTA_ERR_YIELDS_TABLE (the table cannot be read or is malformed; the
 * message names the file and line). On error the earlier population, if
 * any, stays in force. */
int ejecta_enable_population(ejecta_context context,
                             const ejecta_population_config *config);

/* ejecta_step_population advances n_stars star particles by dt (code
 * time): it asks the population what each releases over [age, age + dt],
 * draws its core-collapse and Type Ia supernovae from the counter-based
 * generator keyed by (ejecta_config.seed, star ID, step_index), couples
 * every channel into the bound gas and keeps the records and the summed
 * ledger in the context, read and applied as after ejecta_step
 * (ejecta_record_count, ejecta_copy_records, ejecta_get_ledger,
 * ejecta_apply_step_records, ejecta_apply_records). The gas is not
 * changed. Supernova ejecta mass and metals are released as their
 * expectation every step, so mass and metal budgets are exact; the
 * energy comes in whole events. The ledger sums the channels, so its
 * stars counts star-channel releases (EJECTA_NUM_STEP_CHANNELS per star,
 * switched-off channels included); per channel see
 * ejecta_get_channel_ledger. Per-star results: ejecta_copy_star_results;
 * a smaller step: ejecta_suggested_step. step_index (>= 0) is the host's,
 * as in ejecta_step: ranks stepping in lockstep pass the same index and
 * draw the same numbers for a star, also after a restart.
 * neighbor_mode, row_offsets and row_indices are as in ejecta_step.
 * Stars are copied; all are checked before anything is done. Errors:
 * EJECTA_ERR_NULL_POINTER, EJECTA_ERR_INVALID_ARGUMENT (n_stars <= 0,
 * step_index < 0, unknown mode, duplicate star IDs),
 * EJECTA_ERR_BAD_VALUE (dt NaN, infinite or negative; a star field NaN,
 * infinite or negative, metallicity >= 1), EJECTA_ERR_NO_POPULATION,
 * EJECTA_ERR_NO_GAS, EJECTA_ERR_NEIGHBORS (as in ejecta_step),
 * EJECTA_ERR_UNDEPOSITED (as in ejecta_step: completed, records, ledger
 * and results valid; what was returned stays with the star: it is not in
 * mass_loss, and its energy is in carried_energy), EJECTA_ERR_INTERNAL (as
 * in ejecta_step). */
int ejecta_step_population(ejecta_context context,
                           const ejecta_star_particle *stars, int64_t n_stars,
                           double dt, int64_t step_index,
                           int32_t neighbor_mode, const int64_t *row_offsets,
                           const int64_t *row_indices);

/* ejecta_copy_star_results copies the per-star results of the last step,
 * one per star in the order the stars were given, into results (capacity
 * entries), with the copy rule above: *written is the n_stars of the step.
 * When the last step was an ejecta_step, failed, or none ran since the gas
 * was bound, there are none (*written = 0). Errors:
 * EJECTA_ERR_NULL_POINTER (written NULL, or results NULL with
 * capacity > 0), EJECTA_ERR_INVALID_ARGUMENT (capacity < 0),
 * EJECTA_ERR_BUFFER_TOO_SMALL (the first capacity results were
 * copied). */
int ejecta_copy_star_results(ejecta_context context,
                             ejecta_star_result *results, int64_t capacity,
                             int64_t *written);

/* ejecta_choose_species sets which elements the context tracks: elements
 * is a NUL-terminated, comma-separated list of chemical symbols (case
 * ignored), e.g. "Fe,O", given the species codes 1, 2, ... in that order
 * (code 0 stays the total metals); NULL or "" restores the default set.
 * Every species_mass array, record and gas species code of the context is
 * then laid out by that set, and a population releases in it (the built-in
 * population has yields for the default set's elements; a yields table
 * must carry every element chosen). Call it after ejecta_create and before
 * ejecta_bind_gas and ejecta_enable_population.
 * Errors: EJECTA_ERR_INVALID_CONTEXT, EJECTA_ERR_INVALID_ARGUMENT (an
 * unknown symbol, an element named twice, an empty entry, more than
 * EJECTA_NUM_SPECIES - 1 elements, "Z" listed, no NUL within 1024 bytes,
 * gas already bound or a population enabled). Nothing changes on error. */
int ejecta_choose_species(ejecta_context context, const char *elements);

/* ejecta_species_count writes to *count the number of species codes of
 * the context's set: 1 (the total metals) plus its elements.
 * Errors: EJECTA_ERR_NULL_POINTER, EJECTA_ERR_INVALID_CONTEXT. */
int ejecta_species_count(ejecta_context context, int32_t *count);

/* ejecta_species_symbol writes the symbol of species code (0 ..
 * count - 1) of the context's set into buffer (capacity bytes; 3 always
 * suffice), NUL-terminated and truncated to fit: "Z" for the total metals,
 * else the element's chemical symbol.
 * Errors: EJECTA_ERR_INVALID_CONTEXT, EJECTA_ERR_INVALID_ARGUMENT (code
 * outside the set, capacity < 0), EJECTA_ERR_NULL_POINTER (buffer NULL
 * with capacity > 0), EJECTA_ERR_BUFFER_TOO_SMALL (truncated). */
int ejecta_species_symbol(ejecta_context context, int32_t code, char *buffer,
                          int64_t capacity);

/* ejecta_suggested_step writes to *dt a smaller step (code time) when, in
 * the last population step, some star expected more supernovae than
 * max_supernovae_per_step (dt scaled so that it would expect that many),
 * and 0 otherwise (also when the last step was not a population step).
 * Errors: EJECTA_ERR_NULL_POINTER, EJECTA_ERR_INVALID_CONTEXT. */
int ejecta_suggested_step(ejecta_context context, double *dt);

/* ejecta_get_channel_ledger copies the ledger of one channel
 * (EJECTA_CHANNEL_*, 0..EJECTA_NUM_STEP_CHANNELS-1) of the last population
 * step into *ledger; the ledgers of the EJECTA_NUM_STEP_CHANNELS channels sum to
 * ejecta_get_ledger's. All zero when the last step was not a population
 * step. Errors: EJECTA_ERR_NULL_POINTER, EJECTA_ERR_INVALID_ARGUMENT
 * (channel out of range). */
int ejecta_get_channel_ledger(ejecta_context context, int32_t channel,
                              ejecta_ledger *ledger);

/* ---- audit dumps (see the types section) -------------------------------- */

/* ejecta_dump_open starts a dump session writing into directory (a
 * NUL-terminated path of at most 4095 bytes, created with its parents if
 * missing; files of an earlier dump there are overwritten, and its
 * manifest.json is removed now, so the directory is not taken for a
 * finished dump until ejecta_dump_finish). species is the species set the
 * species codes of the gas and star columns refer to: NULL or "" for the
 * default set (the EJECTA_SPECIES_* codes), or a comma-separated list of
 * chemical symbols as for ejecta_choose_species (codes 1, 2, ... in that
 * order; 0 the total metals) — pass the same list as the host's context,
 * if it has one. box_size is the periodic box side per axis (code length;
 * 0 leaves an axis open), or NULL for an open box. The handle goes to
 * *dump (0 on failure); on failure a NUL-terminated reason goes to
 * error_text (capacity bytes; may be NULL when capacity is 0). Errors:
 * EJECTA_ERR_NULL_POINTER (directory or dump NULL),
 * EJECTA_ERR_INVALID_ARGUMENT (directory empty or not NUL-terminated,
 * species list malformed: unknown symbol, an element twice, "Z" listed,
 * more than EJECTA_NUM_SPECIES - 1 elements; box side negative or not
 * finite), EJECTA_ERR_DUMP_FILE (the directory or its folders cannot be
 * created). Thread safe. */
int ejecta_dump_open(const char *directory, const char *species,
                     const double box_size[3], ejecta_dump *dump,
                     char *error_text, int64_t capacity);

/* ejecta_dump_gas_before writes the gas as it is before the host's
 * feedback sub-step: positions, velocities, masses, specific internal
 * energies, IDs and the species fractions listed (codes of the dump's
 * set), read through the descriptor's columns at this call (density and
 * smoothing_length are not read and may be NULL; columns may be of any
 * element type). Call it once per session. Errors:
 * EJECTA_ERR_NULL_POINTER (gas, a required column, species lists with
 * n_species > 0), EJECTA_ERR_INVALID_ARGUMENT (count <= 0, unknown element
 * type, stride smaller than or not a multiple of the element, misaligned
 * data, species code outside the set or repeated, two elements with one
 * ID, called twice), EJECTA_ERR_BAD_VALUE (a value NaN or infinite, an
 * ID in a float column not an integer; the message names the column and
 * the element), EJECTA_ERR_DUMP_FILE. Nothing is written on error. */
int ejecta_dump_gas_before(ejecta_dump dump, const ejecta_gas *gas);

/* ejecta_dump_gas_after writes the gas after the host's feedback
 * sub-step, as ejecta_dump_gas_before. The elements must be those of the
 * gas before (the same IDs, in any order) with the same species listed;
 * negative masses or energies are written as they are (the audit reports
 * them). Errors: those of ejecta_dump_gas_before, and
 * EJECTA_ERR_INVALID_ARGUMENT also for a count or species list other than
 * the gas before's, an ID missing or new, no gas before written yet, or a
 * second call. */
int ejecta_dump_gas_after(ejecta_dump dump, const ejecta_gas *gas);

/* ejecta_dump_stars adds stars and their releases to the dump, read
 * through the columns of *stars at this call and kept until
 * ejecta_dump_finish writes them. It may be called any number of times
 * (e.g. once per star, or per channel: a star listed twice releases
 * twice), at any point before ejecta_dump_finish; a step without stars
 * calls it once with count 0. Errors: EJECTA_ERR_NULL_POINTER (stars, a
 * required column, species lists with n_species > 0),
 * EJECTA_ERR_INVALID_ARGUMENT (count < 0, unknown element type, bad stride
 * or alignment, species code outside the set or repeated),
 * EJECTA_ERR_BAD_VALUE (a value NaN or infinite, or a radius or release
 * negative; the message names the column and the star). Nothing is added
 * on error. */
int ejecta_dump_stars(ejecta_dump dump, const ejecta_star_columns *stars);

/* ejecta_dump_finish writes the stars and then manifest.json, which makes
 * the directory a complete dump: "ejecta audit -manifest
 * DIRECTORY/manifest.json" audits it. Afterwards only
 * ejecta_dump_last_error and ejecta_dump_close accept the session.
 * Errors: EJECTA_ERR_INVALID_ARGUMENT (the gas before, the gas after or
 * the stars not written yet; already finished), EJECTA_ERR_DUMP_FILE. */
int ejecta_dump_finish(ejecta_dump dump);

/* ejecta_dump_close ends the session *dump and sets *dump to 0; the files
 * written stay (without ejecta_dump_finish there is no manifest). Closing
 * 0 is a no-op returning EJECTA_OK. Errors: EJECTA_ERR_NULL_POINTER,
 * EJECTA_ERR_INVALID_CONTEXT (closed already), EJECTA_ERR_BUSY. */
int ejecta_dump_close(ejecta_dump *dump);

/* ejecta_dump_last_error writes the message of the last failed call on
 * the session (empty after a success) as ejecta_last_error does for a
 * context. Errors: EJECTA_ERR_NULL_POINTER (buffer NULL with
 * capacity > 0), EJECTA_ERR_INVALID_CONTEXT, EJECTA_ERR_BUSY,
 * EJECTA_ERR_BUFFER_TOO_SMALL (truncated; *length is the full length). */
int ejecta_dump_last_error(ejecta_dump dump, char *buffer, int64_t capacity,
                           int64_t *length);

/* ---- ledger arithmetic -------------------------------------------------- */

/* ejecta_ledger_balanced checks that a ledger (one step's, or a sum over
 * ranks) balances: every component of released - deposited - undeposited
 * (energy: minus radiated too) within relative_tolerance of its scale (the
 * larger of released and deposited, and momentum_scale / energy_scale).
 * relative_tolerance ~1e-12 suits float64 round-off. On imbalance a
 * NUL-terminated message goes to message (capacity bytes; may be NULL when
 * capacity is 0). Errors: EJECTA_ERR_NULL_POINTER, EJECTA_ERR_INVALID_ARGUMENT
 * (tolerance negative, NaN or infinite), EJECTA_ERR_IMBALANCE. Thread
 * safe. */
int ejecta_ledger_balanced(const ejecta_ledger *ledger,
                           double relative_tolerance, char *message,
                           int64_t capacity);

#endif /* EJECTA_NO_PROTOTYPES */

#ifdef __cplusplus
}
#endif

#endif /* EJECTA_H */
