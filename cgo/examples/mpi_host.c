/*
 * mpi_host.c — an MPI host of ejecta. One gas set (a jittered lattice in a
 * periodic box) is decomposed over the ranks in slabs of x, and supernovae
 * are coupled by stochastic heating (a scheme that draws which elements
 * it heats) for N_STEPS steps. Every step, on every rank:
 *
 *   1. each rank sends as ghosts its elements within the coupling radius
 *      of another rank's slab (MPI_Alltoallv), refreshed with the gas as
 *      the last step left it;
 *   2. own + ghost gas is bound and the stars of the rank's slab that go
 *      off this step are stepped with ejecta_step (radius mode, so a star
 *      couples to the same gas whatever the decomposition, and the host's
 *      step index, so it draws the same elements). In step 1 the stars of
 *      the upper half of the box are quiet: on two or more ranks some
 *      ranks have no stars then and skip the call, which must change
 *      nothing;
 *   3. records of ghost elements go to their owners (MPI_Alltoallv), and
 *      each rank applies its own and the received records located by gas
 *      ID;
 *   4. the ledgers are summed over ranks (MPI_Allreduce) and must balance.
 *
 * At the end the gas must have gained exactly what the ledgers deposited,
 * and rank 0 writes the final gas, gathered and sorted by ID, as a binary
 * dump (argv[1]): the same bytes for any number of ranks.
 *
 * Output (rank 0): key=value lines and "result pass". Code units: pc,
 * Msun, km/s.
 */
#include <math.h>
#include <mpi.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ejecta.h"

#define SIDE 12           /* lattice side: SIDE^3 elements */
#define N_GAS (SIDE * SIDE * SIDE)
#define BOX 12.0          /* periodic box, pc */
#define RADIUS 2.0        /* coupling radius, pc */
#define N_STARS 24
#define N_STEPS 3
#define QUIET_STEP 1      /* the step in which the upper half of the box is quiet */

#include "mpi_common.h"

/* Periodic distance in x from x to the slab of rank r. */
static double slab_distance(double x, int r) {
  double lo = r * (BOX / nranks), hi = (r + 1) * (BOX / nranks);
  if (x >= lo && x < hi) return 0;
  double best = INFINITY;
  for (int shift = -1; shift <= 1; shift++) {
    double xs = x + shift * BOX;
    double d = xs < lo ? lo - xs : (xs >= hi ? xs - hi : 0);
    if (d < best) best = d;
  }
  return best;
}

/* Rank q wants as ghosts the elements within the coupling radius (plus a
 * margin) of its slab. */
static int near_slab(const element *e, int q, const void *arg) {
  (void)arg;
  return slab_distance(e->pos[0], q) <= RADIUS * 1.01;
}

/* Supernova s (the same on every rank): 5-15 Msun of ejecta, 1e51 erg. */
static ejecta_star supernova(int s) {
  ejecta_star st;
  memset(&st, 0, sizeof st);
  st.id = 100 + 11 * s;
  for (int a = 0; a < 3; a++) {
    st.position[a] = BOX * unit_hash(1000 + s, a);
    st.velocity[a] = 5.0 * (unit_hash(1000 + s, 3 + a) - 0.5);
  }
  st.mass = 500;
  st.metallicity = 0.01;
  st.age = 6;
  st.channel = s % 2 ? EJECTA_CHANNEL_CORE_COLLAPSE : EJECTA_CHANNEL_TYPE_IA;
  st.ejected_mass = 5 + 10 * unit_hash(1000 + s, 6);
  st.species_mass[EJECTA_SPECIES_METALS] = 0.2 * st.ejected_mass;
  st.species_mass[EJECTA_SPECIES_IRON] = 0.01 * st.ejected_mass;
  st.energy = FOE_CODE;
  st.events = 1;
  return st;
}

int main(int argc, char **argv) {
  MPI_Init(&argc, &argv);
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &nranks);
  if (argc < 2) {
    if (rank == 0) fprintf(stderr, "usage: mpi_host DUMP_PATH\n");
    MPI_Abort(MPI_COMM_WORLD, 2);
  }

  /* This rank's own gas, n_H ~ 100 cm^-3 (3.45 Msun/pc^3, 1.4 m_p n_H):
   * enough mass around each star that stochastic heating heats only some
   * of it, so the draws matter. Own elements live at the front of
   * 'local'; ghosts are appended behind them each step. */
  element *local = alloc(N_GAS, sizeof *local);
  int n_own = 0;
  for (int i = 0; i < N_GAS; i++) {
    element e = lattice_element(i, SIDE, BOX / SIDE, 3.45);
    if (owner_of(e.pos[0]) == rank) local[n_own++] = e;
  }
  gas_totals before = global_totals(local, n_own);

  ejecta_config cfg;
  must(0, ejecta_config_defaults(&cfg), "defaults");
  use_host_units(&cfg);
  snprintf(cfg.scheme, sizeof cfg.scheme, "%s", "stochastic-heating");
  cfg.seed = 77;
  cfg.coupling_radius = RADIUS;
  /* Results do not depend on the worker count: odd ranks use two. */
  cfg.worker_threads = 1 + rank % 2;
  for (int a = 0; a < 3; a++) cfg.box_size[a] = BOX;
  char err[256];
  ejecta_context ctx = 0;
  int code = ejecta_create(&cfg, &ctx, err, sizeof err);
  if (code) {
    fprintf(stderr, "FAIL rank %d create: %s\n", rank, err);
    MPI_Abort(MPI_COMM_WORLD, 2);
  }

  exchange x;
  exchange_init(&x);
  int *ghost_owner = NULL;
  ejecta_star *stars = alloc(N_STARS, sizeof *stars);
  int64_t total_stars = 0, total_records = 0, ghost_records = 0, changed = 0, skipped_calls = 0;
  double released_mass = 0, deposited_mass = 0, deposited_energy = 0, radiated = 0, radial_momentum = 0;
  double extra_energy = 0, momentum_scale = 0, energy_scale = 0, deposited_momentum[3] = {0, 0, 0};

  for (int64_t k = 0; k < N_STEPS; k++) {
    /* 1. Ghosts, refreshed from the gas as the last step left it. */
    int n_ghost = exchange_ghosts(&x, &local, n_own, &ghost_owner, near_slab, NULL);
    /* 2. Bind own + ghost gas (the buffer may have moved); step the
     * stars of this slab that go off now, or skip the call. */
    bind_elements(ctx, local, n_own + n_ghost);
    int n_stars = 0;
    for (int s = 0; s < N_STARS; s++) {
      ejecta_star st = supernova(s);
      int quiet = k == QUIET_STEP && st.position[0] >= BOX / 2;
      if (!quiet && owner_of(st.position[0]) == rank) stars[n_stars++] = st;
    }
    ejecta_ledger led;
    memset(&led, 0, sizeof led);
    int64_t n_rec = 0;
    ejecta_record *recs = NULL;
    if (n_stars > 0) {
      must(ctx, ejecta_step(ctx, stars, n_stars, k, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), "step");
      recs = copy_step_records(ctx, &n_rec);
      must(ctx, ejecta_get_ledger(ctx, &led), "ledger");
    } else {
      skipped_calls++;
    }
    /* 3. Route ghost records to their owners and apply. */
    ejecta_apply_report rep;
    int64_t crossing = route_and_apply(&x, ctx, recs, n_rec, n_own, ghost_owner, &rep);
    free(recs);

    /* 4. Global account of the step. */
    reduce_ledger(&led);
    if (rank == 0) {
      char msg[256];
      CHECK(ejecta_ledger_balanced(&led, 1e-12, msg, sizeof msg) == EJECTA_OK, "step %lld global ledger: %s",
            (long long)k, msg);
      CHECK(led.skipped == 0, "step %lld: %lld stars skipped", (long long)k, (long long)led.skipped);
    }
    total_stars += led.stars;
    total_records += global_sum_int(n_rec);
    ghost_records += global_sum_int(crossing);
    changed += global_sum_int(rep.elements);
    released_mass += led.released.mass;
    deposited_mass += led.deposited.mass;
    deposited_energy += led.deposited.energy;
    radiated += led.radiated;
    radial_momentum += led.radial_momentum;
    for (int a = 0; a < 3; a++) deposited_momentum[a] += led.deposited.momentum[a];
    extra_energy += global_sum(rep.reclaimed) + global_sum(rep.shortfall);
    momentum_scale += led.momentum_scale;
    energy_scale += led.energy_scale;
  }
  skipped_calls = global_sum_int(skipped_calls);

  /* Global checks over the run, and the final gas on rank 0. */
  gas_totals after = global_totals(local, n_own);
  element *all = gather_gas(&x, local, n_own, N_GAS);
  if (rank == 0) {
    CHECK(write_dump(argv[1], all, sizeof *all, N_GAS) == 0, "writing %s", argv[1]);
    double dm = after.mass - before.mass, de = after.energy - before.energy;
    CHECK(fabs(dm - deposited_mass) <= 1e-12 * after.mass, "gas mass gain %.17g vs deposited %.17g", dm, deposited_mass);
    CHECK(fabs(de - (deposited_energy + extra_energy)) <= 1e-10 * (after.energy + energy_scale),
          "gas energy gain %.17g vs deposited %.17g", de, deposited_energy);
    for (int a = 0; a < 3; a++)
      CHECK(fabs((after.momentum[a] - before.momentum[a]) - deposited_momentum[a]) <=
                1e-10 * (momentum_scale + before.momentum_abs),
            "gas momentum gain axis %d", a);
    printf("ranks=%d steps=%d stars=%lld records=%lld ghost_records=%lld elements_changed=%lld skipped_calls=%lld\n",
           nranks, N_STEPS, (long long)total_stars, (long long)total_records, (long long)ghost_records,
           (long long)changed, (long long)skipped_calls);
    printf("released_mass=%.17g deposited_mass=%.17g deposited_energy=%.17g radiated=%.17g radial_momentum=%.17g\n",
           released_mass, deposited_mass, deposited_energy, radiated, radial_momentum);
    printf("gas_mass_gain=%.17g gas_energy_gain=%.17g extra_energy=%.17g\n", dm, de, extra_energy);
  }
  ejecta_destroy(&ctx);
  exchange_free(&x);
  free(local); free(ghost_owner); free(stars); free(all);
  int result = all_ranks_verdict();
  MPI_Finalize();
  return result;
}
