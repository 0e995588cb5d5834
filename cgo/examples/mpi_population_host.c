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

static void *alloc(size_t n, size_t size) {
  void *p = calloc(n + 1, size); /* +1: never a zero-size request */
  if (!p) {
    fprintf(stderr, "FAIL rank %d: out of memory\n", rank);
    MPI_Abort(MPI_COMM_WORLD, 2);
  }
  return p;
}

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

/* Mass, total energy (thermal + kinetic), momentum and the sum of |p| of
 * the first n elements. */
static void totals(const element *g, int n, double *mass, double *energy, double p[3], double *pabs) {
  *mass = *energy = *pabs = 0;
  p[0] = p[1] = p[2] = 0;
  for (int i = 0; i < n; i++) {
    double v2 = 0;
    for (int a = 0; a < 3; a++) {
      v2 += g[i].vel[a] * g[i].vel[a];
      p[a] += g[i].mass * g[i].vel[a];
      *pabs += g[i].mass * fabs(g[i].vel[a]);
    }
    *mass += g[i].mass;
    *energy += g[i].mass * (g[i].energy + 0.5 * v2);
  }
}

static double global_sum(double v) {
  double s;
  MPI_Allreduce(&v, &s, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  return s;
}

static int64_t global_sum_int(int64_t v) {
  int64_t s;
  MPI_Allreduce(&v, &s, 1, MPI_INT64_T, MPI_SUM, MPI_COMM_WORLD);
  return s;
}

/* Writes n items of size bytes to path; 0 on success. */
static int write_dump(const char *path, const void *items, size_t size, size_t n) {
  FILE *f = fopen(path, "wb");
  if (!f) return -1;
  int bad = fwrite(items, size, n, f) != n;
  bad |= fclose(f) != 0;
  return bad ? -1 : 0;
}

int main(int argc, char **argv) {
  MPI_Init(&argc, &argv);
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &nranks);
  if (argc < 3) {
    if (rank == 0) fprintf(stderr, "usage: mpi_population_host GAS_DUMP STAR_DUMP\n");
    MPI_Abort(MPI_COMM_WORLD, 2);
  }
  const double h = BOX / SIDE;
  const double myr = 1.0 / 0.97779222; /* code time per Myr */
  const double dt = 1.0 * myr;

  /* This rank's own gas: n_H ~ 100 cm^-3 (3.45 Msun/pc^3, 1.4 m_p n_H),
   * a few 1e3-1e4 K, solar-ish metallicity. Own elements live at the
   * front of 'local'; ghosts are appended behind them each step. */
  element *local = alloc(N_GAS, sizeof *local);
  int n_own = 0;
  for (int i = 0; i < N_GAS; i++) {
    element e;
    memset(&e, 0, sizeof e);
    int idx[3] = {i % SIDE, (i / SIDE) % SIDE, i / (SIDE * SIDE)};
    for (int a = 0; a < 3; a++) {
      e.pos[a] = (idx[a] + 0.5 + 0.3 * (unit_hash(i, a) - 0.5)) * h;
      e.vel[a] = 2.0 * (unit_hash(i, 3 + a) - 0.5);
    }
    e.density = 3.45 * (1 + 0.5 * unit_hash(i, 6));
    e.mass = 3.45 * h * h * h;
    e.energy = 50.0 + 100.0 * unit_hash(i, 7);
    e.metals = 0.0134 * unit_hash(i, 8);
    e.id = 7 + 3 * (int64_t)i;
    if (owner_of(e.pos[0]) == rank) local[n_own++] = e;
  }
  double gm0, ge0, gp0[3], pabs0;
  {
    double m, e, p[3], pa;
    totals(local, n_own, &m, &e, p, &pa);
    gm0 = global_sum(m);
    ge0 = global_sum(e);
    pabs0 = global_sum(pa);
    MPI_Allreduce(p, gp0, 3, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  }

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
  ejecta_config_defaults(&cfg);
  cfg.length_cm = 3.0856775814913673e18;
  cfg.mass_g = 1.988409870698051e33;
  cfg.velocity_cm_per_s = 1e5;
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
  ejecta_population_defaults(&pc); /* Kroupa 0.1-100 Msun, every channel on */
  pc.delayed_cooling = 1;
  if ((code = ejecta_enable_population(ctx, &pc))) die("enable population", ctx, code);

  int *scount = alloc(nranks, sizeof(int)), *rcount = alloc(nranks, sizeof(int));
  int *sdispl = alloc(nranks, sizeof(int)), *rdispl = alloc(nranks, sizeof(int));
  int *fill = alloc(nranks, sizeof(int));
  int *star_counts = alloc(nranks, sizeof(int)), *star_displs = alloc(nranks, sizeof(int));
  double *my_pos = alloc(3 * N_STARS, sizeof(double)), *all_pos = alloc(3 * N_STARS, sizeof(double));
  int *all_owner = alloc(N_STARS, sizeof(int));
  element *sendbuf = NULL;
  int *ghost_owner = NULL;
  ejecta_record *recs = NULL, *out = NULL, *in = NULL;
  ejecta_star_result *res = alloc(N_STARS, sizeof *res);
  MPI_Datatype elem_t, rec_t;
  MPI_Type_contiguous(sizeof(element), MPI_BYTE, &elem_t);
  MPI_Type_commit(&elem_t);
  MPI_Type_contiguous(sizeof(ejecta_record), MPI_BYTE, &rec_t);
  MPI_Type_commit(&rec_t);

  int failures = 0;
  int64_t total_records = 0, ghost_records = 0, ghost_elements = 0, sn_cc = 0, sn_ia = 0;
  double lost = 0, deposited_energy = 0, extra_energy = 0, momentum_scale = 0, energy_scale = 0;
  double deposited_momentum[3] = {0, 0, 0}, min_suggested = 0;
  double channel_mass[EJECTA_NUM_STEP_CHANNELS] = {0}, channel_energy[EJECTA_NUM_STEP_CHANNELS] = {0};
  const double reach2 = (RADIUS * MARGIN) * (RADIUS * MARGIN);

  for (int64_t k = 0; k < N_STEPS; k++) {
    /* 1. Ghosts: every rank learns where every star is, then sends each
     * other rank its elements within reach of that rank's stars. */
    for (int s = 0; s < n_stars; s++)
      for (int a = 0; a < 3; a++) my_pos[3 * s + a] = stars[s].position[a];
    int n3 = 3 * n_stars;
    MPI_Allgather(&n3, 1, MPI_INT, star_counts, 1, MPI_INT, MPI_COMM_WORLD);
    exclusive_sum(star_counts, star_displs, nranks);
    MPI_Allgatherv(my_pos, n3, MPI_DOUBLE, all_pos, star_counts, star_displs, MPI_DOUBLE, MPI_COMM_WORLD);
    int n_all = (star_displs[nranks - 1] + star_counts[nranks - 1]) / 3;
    for (int q = 0; q < nranks; q++)
      for (int s = star_displs[q] / 3; s < (star_displs[q] + star_counts[q]) / 3; s++) all_owner[s] = q;

    memset(scount, 0, nranks * sizeof(int));
    for (int pass = 0; pass < 2; pass++) {
      /* pass 0 counts, pass 1 fills */
      if (pass == 1) {
        exclusive_sum(scount, sdispl, nranks);
        free(sendbuf);
        sendbuf = alloc(sdispl[nranks - 1] + scount[nranks - 1], sizeof *sendbuf);
        memset(fill, 0, nranks * sizeof(int));
      }
      for (int i = 0; i < n_own; i++) {
        int last = -1; /* stars are grouped by owner: one send per rank */
        for (int s = 0; s < n_all; s++) {
          int q = all_owner[s];
          if (q == rank || q == last) continue;
          if (periodic_distance2(local[i].pos, &all_pos[3 * s]) <= reach2) {
            if (pass == 0)
              scount[q]++;
            else
              sendbuf[sdispl[q] + fill[q]++] = local[i];
            last = q;
          }
        }
      }
    }
    MPI_Alltoall(scount, 1, MPI_INT, rcount, 1, MPI_INT, MPI_COMM_WORLD);
    exclusive_sum(rcount, rdispl, nranks);
    int n_ghost = rdispl[nranks - 1] + rcount[nranks - 1];
    element *grown = realloc(local, (size_t)(n_own + n_ghost + 1) * sizeof *local);
    if (!grown) die("out of memory", 0, 0);
    local = grown;
    free(ghost_owner);
    ghost_owner = alloc(n_ghost, sizeof(int));
    MPI_Alltoallv(sendbuf, scount, sdispl, elem_t, local + n_own, rcount, rdispl, elem_t, MPI_COMM_WORLD);
    for (int q = 0; q < nranks; q++)
      for (int j = 0; j < rcount[q]; j++) ghost_owner[rdispl[q] + j] = q;
    ghost_elements += n_ghost;

    /* 2. Bind own + ghost gas (the buffer may have moved) and step. */
    ejecta_gas g;
    memset(&g, 0, sizeof g);
    g.count = n_own + n_ghost;
    for (int a = 0; a < 3; a++) {
      g.position[a] = col(&local[0].pos[a], EJECTA_FLOAT64);
      g.velocity[a] = col(&local[0].vel[a], EJECTA_FLOAT64);
    }
    g.mass = col(&local[0].mass, EJECTA_FLOAT64);
    g.density = col(&local[0].density, EJECTA_FLOAT64);
    g.internal_energy = col(&local[0].energy, EJECTA_FLOAT64);
    g.id = col(&local[0].id, EJECTA_INT64);
    int32_t species[1] = {EJECTA_SPECIES_METALS};
    ejecta_field fractions[1] = {col(&local[0].metals, EJECTA_FLOAT64)};
    g.n_species = 1;
    g.species = species;
    g.species_fraction = fractions;
    if ((code = ejecta_bind_gas(ctx, &g))) die("bind", ctx, code);

    ejecta_ledger led, ch[EJECTA_NUM_STEP_CHANNELS];
    memset(&led, 0, sizeof led);
    memset(ch, 0, sizeof ch);
    int64_t n_rec = 0;
    double suggested = 0;
    if (n_stars > 0) {
      code = ejecta_step_population(ctx, stars, n_stars, dt, k, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL);
      if (code) die("population step", ctx, code);
      if ((code = ejecta_record_count(ctx, &n_rec))) die("count", ctx, code);
      free(recs);
      recs = alloc(n_rec, sizeof *recs);
      int64_t written;
      if ((code = ejecta_copy_records(ctx, recs, n_rec, &written))) die("copy records", ctx, code);
      if ((code = ejecta_get_ledger(ctx, &led))) die("ledger", ctx, code);
      for (int32_t c = 0; c < EJECTA_NUM_STEP_CHANNELS; c++)
        if ((code = ejecta_get_channel_ledger(ctx, c, &ch[c]))) die("channel ledger", ctx, code);
      if ((code = ejecta_copy_star_results(ctx, res, n_stars, &written))) die("star results", ctx, code);
      if (written != n_stars) die("star results count", ctx, 0);
      if ((code = ejecta_suggested_step(ctx, &suggested))) die("suggested step", ctx, code);
    }

    /* 3. Route records: own elements stay, ghost records go to their
     * owners; then apply own and received records by gas ID. */
    memset(scount, 0, nranks * sizeof(int));
    for (int64_t r = 0; r < n_rec; r++) {
      int64_t i = recs[r].gas_index;
      scount[i < n_own ? rank : ghost_owner[i - n_own]]++;
    }
    int64_t crossing = n_rec - scount[rank];
    MPI_Alltoall(scount, 1, MPI_INT, rcount, 1, MPI_INT, MPI_COMM_WORLD);
    exclusive_sum(scount, sdispl, nranks);
    exclusive_sum(rcount, rdispl, nranks);
    int n_in = rdispl[nranks - 1] + rcount[nranks - 1];
    free(out);
    free(in);
    out = alloc(n_rec, sizeof *out);
    in = alloc(n_in, sizeof *in);
    memset(fill, 0, nranks * sizeof(int));
    for (int64_t r = 0; r < n_rec; r++) {
      int64_t i = recs[r].gas_index;
      int q = i < n_own ? rank : ghost_owner[i - n_own];
      out[sdispl[q] + fill[q]++] = recs[r];
    }
    MPI_Alltoallv(out, scount, sdispl, rec_t, in, rcount, rdispl, rec_t, MPI_COMM_WORLD);
    ejecta_apply_report rep;
    memset(&rep, 0, sizeof rep);
    if ((code = ejecta_apply_records(ctx, in, n_in, EJECTA_LOCATE_BY_ID, &rep))) die("apply", ctx, code);

    /* 4. The stars lose what was deposited, carry what was not. */
    double step_loss = 0;
    for (int s = 0; s < n_stars; s++) {
      if (res[s].id != stars[s].id) die("star results out of order", ctx, 0);
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
      if (ejecta_ledger_balanced(&led, 1e-12, msg, sizeof msg) != EJECTA_OK) {
        fprintf(stderr, "FAIL step %lld global ledger: %s\n", (long long)k, msg);
        failures++;
      }
      if (led.stars != (int64_t)N_STARS * EJECTA_NUM_STEP_CHANNELS || led.skipped != 0) {
        fprintf(stderr, "FAIL step %lld: ledger stars %lld skipped %lld\n", (long long)k, (long long)led.stars,
                (long long)led.skipped);
        failures++;
      }
      if (fabs(global_loss - led.deposited.mass) > 1e-12 * led.deposited.mass) {
        fprintf(stderr, "FAIL step %lld: stars lost %.17g, ledger deposited %.17g\n", (long long)k, global_loss,
                led.deposited.mass);
        failures++;
      }
      printf("step=%lld step_records=%lld step_ghost_records=%lld step_deposited_mass=%.17g\n", (long long)k,
             (long long)step_records, (long long)step_crossing, led.deposited.mass);
    }
  }

  /* Global checks over the run. */
  double gm1, ge1, gp1[3];
  {
    double m, e, p[3], pa;
    totals(local, n_own, &m, &e, p, &pa);
    gm1 = global_sum(m);
    ge1 = global_sum(e);
    MPI_Allreduce(p, gp1, 3, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  }
  int64_t total_sn_cc = global_sum_int(sn_cc), total_sn_ia = global_sum_int(sn_ia);

  /* Gather the final owned gas and the stars on rank 0, sorted by ID. */
  int *counts = alloc(nranks, sizeof(int)), *displs = alloc(nranks, sizeof(int));
  MPI_Gather(&n_own, 1, MPI_INT, counts, 1, MPI_INT, 0, MPI_COMM_WORLD);
  exclusive_sum(counts, displs, nranks);
  element *all = alloc(N_GAS, sizeof *all);
  MPI_Gatherv(local, n_own, elem_t, all, counts, displs, elem_t, 0, MPI_COMM_WORLD);
  for (int s = 0; s < n_stars; s++) mine[s].star = stars[s];
  MPI_Datatype star_t;
  MPI_Type_contiguous(sizeof(star_record), MPI_BYTE, &star_t);
  MPI_Type_commit(&star_t);
  MPI_Gather(&n_stars, 1, MPI_INT, counts, 1, MPI_INT, 0, MPI_COMM_WORLD);
  exclusive_sum(counts, displs, nranks);
  star_record *all_stars = alloc(N_STARS, sizeof *all_stars);
  MPI_Gatherv(mine, n_stars, star_t, all_stars, counts, displs, star_t, 0, MPI_COMM_WORLD);

  if (rank == 0) {
    qsort(all, N_GAS, sizeof *all, element_by_id);
    qsort(all_stars, N_STARS, sizeof *all_stars, star_by_id);
    if (write_dump(argv[1], all, sizeof *all, N_GAS) || write_dump(argv[2], all_stars, sizeof *all_stars, N_STARS)) {
      fprintf(stderr, "FAIL writing %s or %s\n", argv[1], argv[2]);
      failures++;
    }
    double dm = gm1 - gm0, de = ge1 - ge0;
    if (fabs(dm - lost) > 1e-12 * gm1) {
      fprintf(stderr, "FAIL gas mass gain %.17g vs star mass loss %.17g\n", dm, lost);
      failures++;
    }
    if (fabs(de - (deposited_energy + extra_energy)) > 1e-10 * (ge1 + energy_scale)) {
      fprintf(stderr, "FAIL gas energy gain %.17g vs deposited %.17g + reclaimed and shortfall %.17g\n", de,
              deposited_energy, extra_energy);
      failures++;
    }
    for (int a = 0; a < 3; a++)
      if (fabs((gp1[a] - gp0[a]) - deposited_momentum[a]) > 1e-10 * (momentum_scale + pabs0)) {
        fprintf(stderr, "FAIL gas momentum gain axis %d: %.17g vs deposited %.17g\n", a, gp1[a] - gp0[a],
                deposited_momentum[a]);
        failures++;
      }
    printf("ranks=%d stars=%d steps=%d gas=%d\n", nranks, N_STARS, N_STEPS, N_GAS);
    printf("records=%lld ghost_records=%lld ghost_elements=%lld\n", (long long)total_records,
           (long long)ghost_records, (long long)ghost_elements);
    printf("supernovae_cc=%lld supernovae_ia=%lld min_suggested=%.17g\n", (long long)total_sn_cc,
           (long long)total_sn_ia, min_suggested);
    static const char *names[EJECTA_NUM_STEP_CHANNELS] = {"core_collapse", "type_ia", "massive_winds",
                                                          "agb_winds", "radiation_pressure", "photoionization"};
    for (int c = 0; c < EJECTA_NUM_STEP_CHANNELS; c++)
      printf("%s_mass=%.17g %s_energy=%.17g\n", names[c], channel_mass[c], names[c], channel_energy[c]);
    printf("star_mass_loss=%.17g gas_mass_gain=%.17g deposited_energy=%.17g gas_energy_gain=%.17g\n", lost, dm,
           deposited_energy, de);
    printf(failures ? "result fail\n" : "result pass\n");
  }
  ejecta_destroy(&ctx);
  MPI_Type_free(&elem_t);
  MPI_Type_free(&rec_t);
  MPI_Type_free(&star_t);
  free(local); free(sendbuf); free(ghost_owner); free(stars); free(mine); free(res); free(recs); free(out);
  free(in); free(scount); free(rcount); free(sdispl); free(rdispl); free(fill); free(star_counts);
  free(star_displs); free(my_pos); free(all_pos); free(all_owner); free(counts); free(displs); free(all);
  free(all_stars);
  MPI_Bcast(&failures, 1, MPI_INT, 0, MPI_COMM_WORLD);
  MPI_Finalize();
  return failures ? 1 : 0;
}
