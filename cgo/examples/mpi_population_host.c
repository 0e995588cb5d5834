/*
 * mpi_population_host.c — an MPI host of ejecta's population steps. One gas
 * set (a jittered lattice in a periodic box) is decomposed over the ranks in
 * slabs of x; a young cluster of star particles (ages spread over 0-40 Myr,
 * so supernovae, winds, radiation pressure and photoionization all act) is
 * spread over the box, each star owned by the rank of its slab. Every step,
 * on every rank:
 *
 *   1. the star positions are shared (MPI_Allgatherv) and each rank sends,
 *      as ghosts, its elements within the coupling radius of another rank's
 *      stars to that rank (MPI_Alltoallv): the ghosts are refreshed with
 *      the gas as the last step left it;
 *   2. own + ghost gas is bound and the rank's own stars are stepped with
 *      ejecta_step_population (radius mode, the same host step index and
 *      seed on every rank, so a star draws the same supernovae and couples
 *      to the same gas whatever the decomposition);
 *   3. records of ghost elements go to their owners (MPI_Alltoallv), each
 *      rank applies its own and the received records located by gas ID;
 *   4. each star is updated from ejecta_copy_star_results (mass loss off its
 *      mass, carried energy passed back, age advanced);
 *   5. the ledgers are summed over ranks (MPI_Allreduce) and must balance,
 *      and the stars' summed mass loss must be what the ledger deposited.
 *
 * At the end the gas must have gained exactly the mass the stars lost and
 * the energy and momentum the ledgers deposited, and rank 0 writes two
 * binary dumps: the final gas gathered and sorted by ID (argv[1]), and the
 * star particles gathered and sorted by ID, each followed by its results of
 * every step (argv[2]). For any number of ranks both dumps must be the
 * same bytes.
 *
 * The stars do not move here (a host that drifts them migrates a star to
 * the rank of its new slab before the step); the gas does not either.
 *
 *   mpirun -np 4 mpi_population_host GAS_DUMP STAR_DUMP
 *
 * Output (rank 0): key=value lines and "result pass". Code units: pc, Msun,
 * km/s (code time 0.9778 Myr).
 */
#include <math.h>
#include <mpi.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ejecta.h"

#define SIDE 14          /* lattice side: SIDE^3 elements */
#define N_GAS (SIDE * SIDE * SIDE)
#define BOX 14.0         /* periodic box side, pc */
#define RADIUS 2.0       /* coupling radius, pc */
#define MARGIN 1.01      /* ghosts are taken a little beyond the radius */
#define N_STARS 32
#define N_STEPS 4

#include "mpi_common.h"

/* A star particle and its results of every step, as dumped. */
typedef struct star_record {
  ejecta_star_particle star;
  ejecta_star_result steps[N_STEPS];
} star_record;

/* Squared distance between a and b in the periodic box. */
static double periodic_distance2(const double a[3], const double b[3]) {
  double d2 = 0;
  for (int k = 0; k < 3; k++) {
    double d = fabs(a[k] - b[k]);
    if (d > 0.5 * BOX) d = BOX - d;
    d2 += d * d;
  }
  return d2;
}

static int star_by_id(const void *a, const void *b) {
  int64_t x = ((const star_record *)a)->star.id, y = ((const star_record *)b)->star.id;
  return (x > y) - (x < y);
}

/* Where every star is this step, and the rank that owns it. */
typedef struct star_map {
  const double *pos;
  const int *owner;
  int n;
} star_map;

/* Rank q wants as ghosts the elements within the coupling radius (plus a
 * margin) of one of its stars. */
static int near_stars_of(const element *e, int q, const void *arg) {
  const star_map *m = arg;
  for (int s = 0; s < m->n; s++)
    if (m->owner[s] == q && periodic_distance2(e->pos, &m->pos[3 * s]) <= (RADIUS * MARGIN) * (RADIUS * MARGIN))
      return 1;
  return 0;
}

int main(int argc, char **argv) {
  MPI_Init(&argc, &argv);
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &nranks);
  if (argc < 3) {
    if (rank == 0) fprintf(stderr, "usage: mpi_population_host GAS_DUMP STAR_DUMP\n");
    MPI_Abort(MPI_COMM_WORLD, 2);
  }
  const double myr = CODE_TIME_PER_MYR;
  const double dt = 1.0 * myr;

  /* This rank's own gas: n_H ~ 100 cm^-3 (3.45 Msun/pc^3, 1.4 m_p n_H),
   * a few 1e3-1e4 K, solar-ish metallicity. Own elements live at the
   * front of 'local'; ghosts are appended behind them each step. */
  element *local = alloc(N_GAS, sizeof *local);
  int n_own = 0;
  for (int i = 0; i < N_GAS; i++) {
    element e = lattice_element(i, SIDE, BOX / SIDE, 3.45);
    if (owner_of(e.pos[0]) == rank) local[n_own++] = e;
  }
  gas_totals before = global_totals(local, n_own);

  /* The stars of this rank's slab: 300-1500 Msun formed, ages 0-40 Myr,
   * metallicity 0.004-0.02. */
  star_record *mine = alloc(N_STARS, sizeof *mine);
  ejecta_star_particle *stars = alloc(N_STARS, sizeof *stars);
  int n_stars = 0;
  for (int s = 0; s < N_STARS; s++) {
    ejecta_star_particle st;
    memset(&st, 0, sizeof st);
    st.id = 5000 + 13 * (int64_t)s;
    for (int a = 0; a < 3; a++) {
      st.position[a] = BOX * unit_hash(1000 + s, a);
      st.velocity[a] = 5.0 * (unit_hash(1000 + s, 3 + a) - 0.5);
    }
    st.formed_mass = st.mass = 300 + 1200 * unit_hash(1000 + s, 6);
    st.metallicity = 0.004 + 0.016 * unit_hash(1000 + s, 7);
    st.age = 40.0 * myr * (s + unit_hash(1000 + s, 8)) / N_STARS;
    if (owner_of(st.position[0]) == rank) stars[n_stars++] = st;
  }

  ejecta_config cfg;
  must(0, ejecta_config_defaults(&cfg), "defaults");
  use_host_units(&cfg);
  cfg.coupling_radius = RADIUS;
  cfg.seed = 20240611;
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
  ejecta_population_config pc;
  must(0, ejecta_population_defaults(&pc), "population defaults"); /* Kroupa 0.1-100 Msun, every channel on */
  pc.delayed_cooling = 1;
  must(ctx, ejecta_enable_population(ctx, &pc), "enable population");

  exchange x;
  exchange_init(&x);
  int *star_counts = alloc(nranks, sizeof(int)), *star_displs = alloc(nranks, sizeof(int));
  double *my_pos = alloc(3 * N_STARS, sizeof(double)), *all_pos = alloc(3 * N_STARS, sizeof(double));
  int *all_owner = alloc(N_STARS, sizeof(int));
  int *ghost_owner = NULL;
  ejecta_star_result *res = alloc(N_STARS, sizeof *res);

  int64_t total_records = 0, ghost_records = 0, ghost_elements = 0, sn_cc = 0, sn_ia = 0;
  double lost = 0, deposited_energy = 0, extra_energy = 0, momentum_scale = 0, energy_scale = 0;
  double deposited_momentum[3] = {0, 0, 0}, min_suggested = 0;
  double channel_mass[EJECTA_NUM_STEP_CHANNELS] = {0}, channel_energy[EJECTA_NUM_STEP_CHANNELS] = {0};

  for (int64_t k = 0; k < N_STEPS; k++) {
    /* 1. Ghosts: every rank learns where every star is, then sends each
     * other rank its elements within reach of that rank's stars. */
    for (int s = 0; s < n_stars; s++)
      for (int a = 0; a < 3; a++) my_pos[3 * s + a] = stars[s].position[a];
    int n3 = 3 * n_stars;
    MPI_Allgather(&n3, 1, MPI_INT, star_counts, 1, MPI_INT, MPI_COMM_WORLD);
    exclusive_sum(star_counts, star_displs, nranks);
    MPI_Allgatherv(my_pos, n3, MPI_DOUBLE, all_pos, star_counts, star_displs, MPI_DOUBLE, MPI_COMM_WORLD);
    star_map map = {all_pos, all_owner, (star_displs[nranks - 1] + star_counts[nranks - 1]) / 3};
    for (int q = 0; q < nranks; q++)
      for (int s = star_displs[q] / 3; s < (star_displs[q] + star_counts[q]) / 3; s++) all_owner[s] = q;
    int n_ghost = exchange_ghosts(&x, &local, n_own, &ghost_owner, near_stars_of, &map);
    ghost_elements += n_ghost;

    /* 2. Bind own + ghost gas (the buffer may have moved) and step. A
     * rank without stars skips the call. */
    bind_elements(ctx, local, n_own + n_ghost);
    ejecta_ledger led, ch[EJECTA_NUM_STEP_CHANNELS];
    memset(&led, 0, sizeof led);
    memset(ch, 0, sizeof ch);
    int64_t n_rec = 0;
    ejecta_record *recs = NULL;
    double suggested = 0;
    if (n_stars > 0) {
      code = ejecta_step_population(ctx, stars, n_stars, dt, k, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL);
      must(ctx, code, "population step");
      recs = copy_step_records(ctx, &n_rec);
      must(ctx, ejecta_get_ledger(ctx, &led), "ledger");
      for (int32_t c = 0; c < EJECTA_NUM_STEP_CHANNELS; c++)
        must(ctx, ejecta_get_channel_ledger(ctx, c, &ch[c]), "channel ledger");
      int64_t written;
      must(ctx, ejecta_copy_star_results(ctx, res, n_stars, &written), "star results");
      CHECK(written == n_stars, "star results written %lld", (long long)written);
      must(ctx, ejecta_suggested_step(ctx, &suggested), "suggested step");
    }

    /* 3. Route ghost records to their owners; apply own and received
     * records by gas ID. */
    ejecta_apply_report rep;
    int64_t crossing = route_and_apply(&x, ctx, recs, n_rec, n_own, ghost_owner, &rep);
    free(recs);

    /* 4. The stars lose what was deposited, carry what was not. */
    double step_loss = 0;
    for (int s = 0; s < n_stars; s++) {
      CHECK(res[s].id == stars[s].id, "star results out of order");
      stars[s].mass -= res[s].mass_loss;
      stars[s].carried_energy = res[s].carried_energy;
      stars[s].age += dt;
      mine[s].steps[k] = res[s];
      step_loss += res[s].mass_loss;
      sn_cc += res[s].supernovae_cc;
      sn_ia += res[s].supernovae_ia;
    }

    /* 5. Global account of the step. */
    reduce_ledger(&led);
    for (int32_t c = 0; c < EJECTA_NUM_STEP_CHANNELS; c++) {
      channel_mass[c] += global_sum(ch[c].released.mass);
      channel_energy[c] += global_sum(ch[c].released.energy);
    }
    double global_loss = global_sum(step_loss);
    lost += global_loss;
    int64_t step_records = global_sum_int(n_rec), step_crossing = global_sum_int(crossing);
    total_records += step_records;
    ghost_records += step_crossing;
    deposited_energy += led.deposited.energy;
    extra_energy += global_sum(rep.reclaimed) + global_sum(rep.shortfall);
    for (int a = 0; a < 3; a++) deposited_momentum[a] += led.deposited.momentum[a];
    momentum_scale += led.momentum_scale;
    energy_scale += led.energy_scale;
    double smallest = suggested > 0 ? suggested : INFINITY, global_smallest;
    MPI_Allreduce(&smallest, &global_smallest, 1, MPI_DOUBLE, MPI_MIN, MPI_COMM_WORLD);
    if (isfinite(global_smallest) && (min_suggested == 0 || global_smallest < min_suggested)) min_suggested = global_smallest;
    if (rank == 0) {
      char msg[256];
      CHECK(ejecta_ledger_balanced(&led, 1e-12, msg, sizeof msg) == EJECTA_OK, "step %lld global ledger: %s",
            (long long)k, msg);
      CHECK(led.stars == (int64_t)N_STARS * EJECTA_NUM_STEP_CHANNELS && led.skipped == 0,
            "step %lld: ledger stars %lld skipped %lld", (long long)k, (long long)led.stars, (long long)led.skipped);
      CHECK(fabs(global_loss - led.deposited.mass) <= 1e-12 * led.deposited.mass,
            "step %lld: stars lost %.17g, ledger deposited %.17g", (long long)k, global_loss, led.deposited.mass);
      printf("step=%lld step_records=%lld step_ghost_records=%lld step_deposited_mass=%.17g\n", (long long)k,
             (long long)step_records, (long long)step_crossing, led.deposited.mass);
    }
  }

  /* Global checks over the run. */
  gas_totals after = global_totals(local, n_own);
  int64_t total_sn_cc = global_sum_int(sn_cc), total_sn_ia = global_sum_int(sn_ia);

  /* Gather the final owned gas and the stars on rank 0, sorted by ID. */
  element *all = gather_gas(&x, local, n_own, N_GAS);
  for (int s = 0; s < n_stars; s++) mine[s].star = stars[s];
  MPI_Datatype star_t;
  MPI_Type_contiguous(sizeof(star_record), MPI_BYTE, &star_t);
  MPI_Type_commit(&star_t);
  MPI_Gather(&n_stars, 1, MPI_INT, star_counts, 1, MPI_INT, 0, MPI_COMM_WORLD);
  exclusive_sum(star_counts, star_displs, nranks);
  star_record *all_stars = alloc(N_STARS, sizeof *all_stars);
  MPI_Gatherv(mine, n_stars, star_t, all_stars, star_counts, star_displs, star_t, 0, MPI_COMM_WORLD);

  if (rank == 0) {
    qsort(all_stars, N_STARS, sizeof *all_stars, star_by_id);
    CHECK(write_dump(argv[1], all, sizeof *all, N_GAS) == 0 &&
              write_dump(argv[2], all_stars, sizeof *all_stars, N_STARS) == 0,
          "writing %s or %s", argv[1], argv[2]);
    double dm = after.mass - before.mass, de = after.energy - before.energy;
    CHECK(fabs(dm - lost) <= 1e-12 * after.mass, "gas mass gain %.17g vs star mass loss %.17g", dm, lost);
    CHECK(fabs(de - (deposited_energy + extra_energy)) <= 1e-10 * (after.energy + energy_scale),
          "gas energy gain %.17g vs deposited %.17g + reclaimed and shortfall %.17g", de, deposited_energy,
          extra_energy);
    for (int a = 0; a < 3; a++)
      CHECK(fabs((after.momentum[a] - before.momentum[a]) - deposited_momentum[a]) <=
                1e-10 * (momentum_scale + before.momentum_abs),
            "gas momentum gain axis %d: %.17g vs deposited %.17g", a, after.momentum[a] - before.momentum[a],
            deposited_momentum[a]);
    printf("ranks=%d stars=%d steps=%d gas=%d\n", nranks, N_STARS, N_STEPS, N_GAS);
    printf("records=%lld ghost_records=%lld ghost_elements=%lld\n", (long long)total_records,
           (long long)ghost_records, (long long)ghost_elements);
    printf("supernovae_cc=%lld supernovae_ia=%lld min_suggested=%.17g\n", (long long)total_sn_cc,
           (long long)total_sn_ia, min_suggested);
    static const char *names[EJECTA_NUM_STEP_CHANNELS] = {"core_collapse",      "type_ia",         "massive_winds",
                                                          "agb_winds",          "radiation_pressure", "photoionization",
                                                          "photoelectric_heating"};
    for (int c = 0; c < EJECTA_NUM_STEP_CHANNELS; c++)
      printf("%s_mass=%.17g %s_energy=%.17g\n", names[c], channel_mass[c], names[c], channel_energy[c]);
    printf("star_mass_loss=%.17g gas_mass_gain=%.17g deposited_energy=%.17g gas_energy_gain=%.17g\n", lost, dm,
           deposited_energy, de);
  }
  ejecta_destroy(&ctx);
  exchange_free(&x);
  MPI_Type_free(&star_t);
  free(local); free(ghost_owner); free(stars); free(mine); free(res); free(star_counts); free(star_displs);
  free(my_pos); free(all_pos); free(all_owner); free(all); free(all_stars);
  int result = all_ranks_verdict();
  MPI_Finalize();
  return result;
}
