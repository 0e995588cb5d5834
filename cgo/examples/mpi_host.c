/*
 * mpi_host.c — an MPI host of ejecta. One gas set (a jittered lattice in a
 * periodic box) is decomposed over the ranks in slabs of x. Each rank
 * imports as ghosts the gas of other ranks within the coupling radius of
 * its slab, runs the step for the stars in its slab (radius mode: every
 * rank sees the same neighbors of a star whatever the decomposition),
 * sends the records of ghost elements back to their owners
 * (MPI_Alltoallv), applies its own records together with those it
 * received (located by gas ID), and rank 0 gathers the final gas, sorts it
 * by ID and writes it as a binary dump (argv[1]). The ledgers are summed
 * over ranks (MPI_Allreduce) and must balance; the gas must gain exactly
 * what the ledger says was deposited.
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
#define BOX 12.0          /* periodic box, pc */
#define RADIUS 2.0        /* coupling radius, pc */
#define N_STARS 24

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

static void totals(const element *g, int n, double *mass, double *energy, double p[3]) {
  *mass = 0;
  *energy = 0;
  p[0] = p[1] = p[2] = 0;
  for (int i = 0; i < n; i++) {
    double v2 = 0;
    for (int a = 0; a < 3; a++) {
      v2 += g[i].vel[a] * g[i].vel[a];
      p[a] += g[i].mass * g[i].vel[a];
    }
    *mass += g[i].mass;
    *energy += g[i].mass * (g[i].energy + 0.5 * v2);
  }
}

int main(int argc, char **argv) {
  MPI_Init(&argc, &argv);
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &nranks);
  if (argc < 2) {
    if (rank == 0) fprintf(stderr, "usage: mpi_host DUMP_PATH\n");
    MPI_Abort(MPI_COMM_WORLD, 2);
  }
  const int n_global = SIDE * SIDE * SIDE;
  const double h = BOX / SIDE;

  /* This rank's own gas. */
  element *own = malloc(n_global * sizeof *own);
  int n_own = 0;
  for (int i = 0; i < n_global; i++) {
    element e;
    memset(&e, 0, sizeof e);
    int idx[3] = {i % SIDE, (i / SIDE) % SIDE, i / (SIDE * SIDE)};
    for (int a = 0; a < 3; a++) {
      e.pos[a] = (idx[a] + 0.5 + 0.3 * (unit_hash(i, a) - 0.5)) * h;
      e.vel[a] = 2.0 * (unit_hash(i, 3 + a) - 0.5);
    }
    e.density = 0.0345 * (1 + 0.5 * unit_hash(i, 6));
    e.mass = 0.0345 * h * h * h;
    e.energy = 50.0 + 100.0 * unit_hash(i, 7);
    e.metals = 0.0134 * unit_hash(i, 8);
    e.id = 7 + 3 * (int64_t)i;
    if (owner_of(e.pos[0]) == rank) own[n_own++] = e;
  }
  double m0, e0, p0[3], gm0, ge0, gp0[3];
  totals(own, n_own, &m0, &e0, p0);
  MPI_Allreduce(&m0, &gm0, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(&e0, &ge0, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(p0, gp0, 3, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);

  /* Ghost exchange: every element within the coupling radius (plus a
   * margin) of another rank's slab goes to that rank. */
  int *scount = calloc(nranks, sizeof(int)), *rcount = calloc(nranks, sizeof(int));
  int *sdispl = calloc(nranks, sizeof(int)), *rdispl = calloc(nranks, sizeof(int));
  for (int i = 0; i < n_own; i++)
    for (int q = 0; q < nranks; q++)
      if (q != rank && slab_distance(own[i].pos[0], q) <= RADIUS * 1.01) scount[q]++;
  MPI_Alltoall(scount, 1, MPI_INT, rcount, 1, MPI_INT, MPI_COMM_WORLD);
  exclusive_sum(scount, sdispl, nranks);
  exclusive_sum(rcount, rdispl, nranks);
  int n_send = sdispl[nranks - 1] + scount[nranks - 1];
  int n_ghost = rdispl[nranks - 1] + rcount[nranks - 1];
  element *sendbuf = malloc((n_send + 1) * sizeof *sendbuf);
  int *fill = calloc(nranks, sizeof(int));
  for (int i = 0; i < n_own; i++)
    for (int q = 0; q < nranks; q++)
      if (q != rank && slab_distance(own[i].pos[0], q) <= RADIUS * 1.01) sendbuf[sdispl[q] + fill[q]++] = own[i];
  /* Local gas: owned elements first, then ghosts (with their owners). */
  element *local = malloc((n_own + n_ghost + 1) * sizeof *local);
  int *ghost_owner = malloc((n_ghost + 1) * sizeof(int));
  memcpy(local, own, n_own * sizeof *local);
  MPI_Datatype elem_t;
  MPI_Type_contiguous(sizeof(element), MPI_BYTE, &elem_t);
  MPI_Type_commit(&elem_t);
  MPI_Alltoallv(sendbuf, scount, sdispl, elem_t, local + n_own, rcount, rdispl, elem_t, MPI_COMM_WORLD);
  for (int q = 0; q < nranks; q++)
    for (int k = 0; k < rcount[q]; k++) ghost_owner[rdispl[q] + k] = q;
  int n_local = n_own + n_ghost;

  /* Stars in this rank's slab. */
  ejecta_star *stars = calloc(N_STARS, sizeof *stars);
  int n_stars = 0;
  double foe = 1e51 / (1.98841e33 * 1e10);
  for (int s = 0; s < N_STARS; s++) {
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
    st.energy = foe;
    st.events = 1;
    if (owner_of(st.position[0]) == rank) stars[n_stars++] = st;
  }

  ejecta_config cfg;
  ejecta_config_defaults(&cfg);
  cfg.length_cm = 3.0856775814913673e18;
  cfg.mass_g = 1.98841e33;
  cfg.velocity_cm_per_s = 1e5;
  cfg.coupling_radius = RADIUS;
  cfg.worker_threads = 1;
  for (int a = 0; a < 3; a++) cfg.box_size[a] = BOX;
  char err[256];
  ejecta_context ctx = 0;
  int code = ejecta_create(&cfg, &ctx, err, sizeof err);
  if (code) {
    fprintf(stderr, "FAIL rank %d create: %s\n", rank, err);
    MPI_Abort(MPI_COMM_WORLD, 2);
  }
  ejecta_gas g;
  memset(&g, 0, sizeof g);
  g.count = n_local;
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

  ejecta_ledger led;
  memset(&led, 0, sizeof led);
  int64_t n_rec = 0;
  ejecta_record *recs = NULL;
  if (n_stars > 0) {
    if ((code = ejecta_step(ctx, stars, n_stars, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL))) die("step", ctx, code);
    if ((code = ejecta_record_count(ctx, &n_rec))) die("count", ctx, code);
    recs = malloc((n_rec + 1) * sizeof *recs);
    int64_t written;
    if ((code = ejecta_copy_records(ctx, recs, n_rec, &written))) die("copy", ctx, code);
    if ((code = ejecta_get_ledger(ctx, &led))) die("ledger", ctx, code);
  }

  /* Route records: own elements stay, ghost records go to their owners. */
  memset(scount, 0, nranks * sizeof(int));
  for (int64_t k = 0; k < n_rec; k++) {
    int64_t i = recs[k].gas_index;
    scount[i < n_own ? rank : ghost_owner[i - n_own]]++;
  }
  int64_t ghost_records = n_rec - scount[rank];
  MPI_Alltoall(scount, 1, MPI_INT, rcount, 1, MPI_INT, MPI_COMM_WORLD);
  exclusive_sum(scount, sdispl, nranks);
  exclusive_sum(rcount, rdispl, nranks);
  int n_in = rdispl[nranks - 1] + rcount[nranks - 1];
  ejecta_record *out = malloc((n_rec + 1) * sizeof *out), *in = malloc((n_in + 1) * sizeof *in);
  memset(fill, 0, nranks * sizeof(int));
  for (int64_t k = 0; k < n_rec; k++) {
    int64_t i = recs[k].gas_index;
    int q = i < n_own ? rank : ghost_owner[i - n_own];
    out[sdispl[q] + fill[q]++] = recs[k];
  }
  MPI_Datatype rec_t;
  MPI_Type_contiguous(sizeof(ejecta_record), MPI_BYTE, &rec_t);
  MPI_Type_commit(&rec_t);
  MPI_Alltoallv(out, scount, sdispl, rec_t, in, rcount, rdispl, rec_t, MPI_COMM_WORLD);
  /* in[] holds this rank's own records and those of other ranks for its
   * elements; locate all of them by gas ID. */
  ejecta_apply_report rep;
  memset(&rep, 0, sizeof rep);
  if ((code = ejecta_apply_records(ctx, in, n_in, EJECTA_LOCATE_BY_ID, &rep))) die("apply", ctx, code);

  /* Global checks. */
  reduce_ledger(&led);
  double reclaimed, shortfall;
  int64_t total_ghost_records, total_records, changed = rep.elements, total_changed;
  MPI_Allreduce(&rep.reclaimed, &reclaimed, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(&rep.shortfall, &shortfall, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(&ghost_records, &total_ghost_records, 1, MPI_INT64_T, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(&n_rec, &total_records, 1, MPI_INT64_T, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(&changed, &total_changed, 1, MPI_INT64_T, MPI_SUM, MPI_COMM_WORLD);
  double m1, e1, p1[3], gm1, ge1, gp1[3];
  totals(local, n_own, &m1, &e1, p1);
  MPI_Allreduce(&m1, &gm1, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(&e1, &ge1, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  MPI_Allreduce(p1, gp1, 3, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);

  /* Gather the final owned gas on rank 0, sorted by ID. */
  int *counts = calloc(nranks, sizeof(int)), *displs = calloc(nranks, sizeof(int));
  MPI_Gather(&n_own, 1, MPI_INT, counts, 1, MPI_INT, 0, MPI_COMM_WORLD);
  exclusive_sum(counts, displs, nranks);
  element *all = rank == 0 ? malloc(n_global * sizeof *all) : NULL;
  MPI_Gatherv(local, n_own, elem_t, all, counts, displs, elem_t, 0, MPI_COMM_WORLD);

  int failures = 0;
  if (rank == 0) {
    qsort(all, n_global, sizeof *all, element_by_id);
    FILE *f = fopen(argv[1], "wb");
    if (!f || fwrite(all, sizeof *all, n_global, f) != (size_t)n_global || fclose(f)) {
      fprintf(stderr, "FAIL writing %s\n", argv[1]);
      failures++;
    }
    char msg[256];
    if (ejecta_ledger_balanced(&led, 1e-12, msg, sizeof msg) != EJECTA_OK) {
      fprintf(stderr, "FAIL global ledger: %s\n", msg);
      failures++;
    }
    double dm = gm1 - gm0, de = ge1 - ge0;
    if (fabs(dm - led.deposited.mass) > 1e-12 * gm1) {
      fprintf(stderr, "FAIL gas mass gain %.17g vs deposited %.17g\n", dm, led.deposited.mass);
      failures++;
    }
    if (fabs(de - (led.deposited.energy + reclaimed + shortfall)) > 1e-10 * (ge1 + led.energy_scale)) {
      fprintf(stderr, "FAIL gas energy gain %.17g vs deposited %.17g\n", de, led.deposited.energy);
      failures++;
    }
    for (int a = 0; a < 3; a++)
      if (fabs((gp1[a] - gp0[a]) - led.deposited.momentum[a]) > 1e-10 * led.momentum_scale) {
        fprintf(stderr, "FAIL gas momentum gain axis %d\n", a);
        failures++;
      }
    if (led.stars != N_STARS || led.skipped != 0) {
      fprintf(stderr, "FAIL stars %lld skipped %lld\n", (long long)led.stars, (long long)led.skipped);
      failures++;
    }
    printf("ranks=%d stars=%lld records=%lld ghost_records=%lld elements_changed=%lld\n", nranks,
           (long long)led.stars, (long long)total_records, (long long)total_ghost_records, (long long)total_changed);
    printf("released_mass=%.17g deposited_mass=%.17g deposited_energy=%.17g radiated=%.17g radial_momentum=%.17g\n",
           led.released.mass, led.deposited.mass, led.deposited.energy, led.radiated, led.radial_momentum);
    printf("gas_mass_gain=%.17g gas_energy_gain=%.17g reclaimed=%.17g shortfall=%.17g\n", dm, de, reclaimed, shortfall);
    printf(failures ? "result fail\n" : "result pass\n");
  }
  ejecta_destroy(&ctx);
  MPI_Type_free(&elem_t);
  MPI_Type_free(&rec_t);
  free(own); free(local); free(sendbuf); free(ghost_owner); free(stars); free(recs); free(out); free(in);
  free(scount); free(rcount); free(sdispl); free(rdispl); free(fill); free(counts); free(displs); free(all);
  MPI_Bcast(&failures, 1, MPI_INT, 0, MPI_COMM_WORLD);
  MPI_Finalize();
  return failures ? 1 : 0;
}
