/*
 * mpi_common.h — what the MPI example hosts share on top of host_common.h:
 * the array-of-structs gas element they decompose, the rank globals, the
 * slab owner of a position, binding own + ghost gas, the ghost exchange
 * (each rank sends the elements another rank asks for, appended behind
 * that rank's own), routing records of ghost elements back to their owners
 * and applying them with the owner's own, sums over ranks (totals of the
 * gas, the ledger in a fixed field order), and writing a dump.
 *
 * Include after <mpi.h>, "ejecta.h" and a definition of BOX (the periodic
 * box side in pc).
 */
#ifndef EJECTA_MPI_COMMON_H
#define EJECTA_MPI_COMMON_H

#include <math.h>
#include <string.h>

static int rank, nranks;

/* must() and every other fatal error stop all ranks. */
#define HOST_ABORT() MPI_Abort(MPI_COMM_WORLD, 2)
#include "host_common.h"

/* One gas element of the hosts' array of structs (pc, Msun, km/s). */
typedef struct element {
  double pos[3];
  double vel[3];
  double mass;
  double density;
  double energy; /* specific internal energy, (km/s)^2 */
  double metals; /* metal mass fraction */
  int64_t id;
} element;

static inline void *alloc(size_t n, size_t size) {
  void *p = calloc(n + 1, size); /* +1: never a zero-size request */
  if (!p) {
    fprintf(stderr, "FAIL rank %d: out of memory\n", rank);
    HOST_ABORT();
  }
  return p;
}

/* The rank whose slab of x holds x. */
static inline int owner_of(double x) {
  int r = (int)floor(x / (BOX / nranks));
  if (r < 0) r = 0;
  if (r >= nranks) r = nranks - 1;
  return r;
}

/* A jittered lattice element i of a side^3 lattice of spacing h, with
 * density rho (the same on every rank). */
static inline element lattice_element(int i, int side, double h, double rho) {
  element e;
  memset(&e, 0, sizeof e);
  int idx[3] = {i % side, (i / side) % side, i / (side * side)};
  for (int a = 0; a < 3; a++) {
    e.pos[a] = (idx[a] + 0.5 + 0.3 * (unit_hash(i, a) - 0.5)) * h;
    e.vel[a] = 2.0 * (unit_hash(i, 3 + a) - 0.5);
  }
  e.density = rho * (1 + 0.5 * unit_hash(i, 6));
  e.mass = rho * h * h * h;
  e.energy = 50.0 + 100.0 * unit_hash(i, 7);
  e.metals = 0.0134 * unit_hash(i, 8);
  e.id = 7 + 3 * (int64_t)i;
  return e;
}

/* Binds the n elements of local (own first, then ghosts). */
static inline void bind_elements(ejecta_context ctx, element *local, int n) {
  ejecta_gas g;
  DESCRIBE_GAS(g, local, n, EJECTA_FLOAT64);
  int32_t species[1] = {EJECTA_SPECIES_METALS};
  ejecta_field fractions[1] = {strided(&local[0].metals, sizeof(element), EJECTA_FLOAT64)};
  g.n_species = 1;
  g.species = species;
  g.species_fraction = fractions;
  must(ctx, ejecta_bind_gas(ctx, &g), "bind");
}

static inline void exclusive_sum(const int *counts, int *displs, int n) {
  displs[0] = 0;
  for (int i = 1; i < n; i++) displs[i] = displs[i - 1] + counts[i - 1];
}

/* exchange holds the per-rank counts and displacements of one all-to-all
 * exchange, and the byte types of elements and records. */
typedef struct exchange {
  int *scount, *rcount, *sdispl, *rdispl, *fill;
  MPI_Datatype elem_t, rec_t;
} exchange;

static inline void exchange_init(exchange *x) {
  x->scount = alloc(nranks, sizeof(int));
  x->rcount = alloc(nranks, sizeof(int));
  x->sdispl = alloc(nranks, sizeof(int));
  x->rdispl = alloc(nranks, sizeof(int));
  x->fill = alloc(nranks, sizeof(int));
  MPI_Type_contiguous(sizeof(element), MPI_BYTE, &x->elem_t);
  MPI_Type_commit(&x->elem_t);
  MPI_Type_contiguous(sizeof(ejecta_record), MPI_BYTE, &x->rec_t);
  MPI_Type_commit(&x->rec_t);
}

static inline void exchange_free(exchange *x) {
  MPI_Type_free(&x->elem_t);
  MPI_Type_free(&x->rec_t);
  free(x->scount); free(x->rcount); free(x->sdispl); free(x->rdispl); free(x->fill);
}

/* ghost_wanted says whether rank q needs own element e as a ghost. */
typedef int (*ghost_wanted)(const element *e, int q, const void *arg);

/* exchange_ghosts sends each own element (the first n_own of *local) to
 * every other rank that wants it, and appends the ghosts this rank
 * receives behind its own elements (*local grows); ghost j came from rank
 * (*ghost_owner)[j]. Returns the number of ghosts. */
static inline int exchange_ghosts(exchange *x, element **local, int n_own, int **ghost_owner, ghost_wanted wanted,
                                  const void *arg) {
  memset(x->scount, 0, nranks * sizeof(int));
  for (int i = 0; i < n_own; i++)
    for (int q = 0; q < nranks; q++)
      if (q != rank && wanted(&(*local)[i], q, arg)) x->scount[q]++;
  exclusive_sum(x->scount, x->sdispl, nranks);
  element *send = alloc(x->sdispl[nranks - 1] + x->scount[nranks - 1], sizeof *send);
  memset(x->fill, 0, nranks * sizeof(int));
  for (int i = 0; i < n_own; i++)
    for (int q = 0; q < nranks; q++)
      if (q != rank && wanted(&(*local)[i], q, arg)) send[x->sdispl[q] + x->fill[q]++] = (*local)[i];
  MPI_Alltoall(x->scount, 1, MPI_INT, x->rcount, 1, MPI_INT, MPI_COMM_WORLD);
  exclusive_sum(x->rcount, x->rdispl, nranks);
  int n_ghost = x->rdispl[nranks - 1] + x->rcount[nranks - 1];
  element *grown = realloc(*local, (size_t)(n_own + n_ghost + 1) * sizeof *grown);
  if (!grown) {
    fprintf(stderr, "FAIL rank %d: out of memory\n", rank);
    HOST_ABORT();
  }
  *local = grown;
  free(*ghost_owner);
  *ghost_owner = alloc(n_ghost, sizeof(int));
  MPI_Alltoallv(send, x->scount, x->sdispl, x->elem_t, *local + n_own, x->rcount, x->rdispl, x->elem_t,
                MPI_COMM_WORLD);
  for (int q = 0; q < nranks; q++)
    for (int j = 0; j < x->rcount[q]; j++) (*ghost_owner)[x->rdispl[q] + j] = q;
  free(send);
  return n_ghost;
}

/* route_and_apply sends the records of ghost elements to their owners,
 * keeps those of own elements, and applies them together with the records
 * received, located by gas ID (records are summed per element in gas-ID,
 * star-ID order, so the result does not depend on the rank count).
 * Returns the number of records that crossed to another rank. */
static inline int64_t route_and_apply(exchange *x, ejecta_context ctx, const ejecta_record *recs, int64_t n_rec,
                                      int n_own, const int *ghost_owner, ejecta_apply_report *rep) {
  memset(x->scount, 0, nranks * sizeof(int));
  for (int64_t k = 0; k < n_rec; k++) {
    int64_t i = recs[k].gas_index;
    x->scount[i < n_own ? rank : ghost_owner[i - n_own]]++;
  }
  int64_t crossing = n_rec - x->scount[rank];
  MPI_Alltoall(x->scount, 1, MPI_INT, x->rcount, 1, MPI_INT, MPI_COMM_WORLD);
  exclusive_sum(x->scount, x->sdispl, nranks);
  exclusive_sum(x->rcount, x->rdispl, nranks);
  int n_in = x->rdispl[nranks - 1] + x->rcount[nranks - 1];
  ejecta_record *out = alloc(n_rec, sizeof *out), *in = alloc(n_in, sizeof *in);
  memset(x->fill, 0, nranks * sizeof(int));
  for (int64_t k = 0; k < n_rec; k++) {
    int64_t i = recs[k].gas_index;
    int q = i < n_own ? rank : ghost_owner[i - n_own];
    out[x->sdispl[q] + x->fill[q]++] = recs[k];
  }
  MPI_Alltoallv(out, x->scount, x->sdispl, x->rec_t, in, x->rcount, x->rdispl, x->rec_t, MPI_COMM_WORLD);
  memset(rep, 0, sizeof *rep);
  must(ctx, ejecta_apply_records(ctx, in, n_in, EJECTA_LOCATE_BY_ID, rep), "apply");
  free(out);
  free(in);
  return crossing;
}

/* copy_step_records copies the records of the context's last step into a
 * new buffer (*n receives their number). */
static inline ejecta_record *copy_step_records(ejecta_context ctx, int64_t *n) {
  must(ctx, ejecta_record_count(ctx, n), "record count");
  ejecta_record *recs = alloc(*n, sizeof *recs);
  int64_t written;
  must(ctx, ejecta_copy_records(ctx, recs, *n, &written), "copy records");
  return recs;
}

static inline double global_sum(double v) {
  double s;
  MPI_Allreduce(&v, &s, 1, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  return s;
}

static inline int64_t global_sum_int(int64_t v) {
  int64_t s;
  MPI_Allreduce(&v, &s, 1, MPI_INT64_T, MPI_SUM, MPI_COMM_WORLD);
  return s;
}

/* gas_totals is the mass, total energy (thermal + kinetic), momentum and
 * sum of |p| of the first n elements, summed over ranks. */
typedef struct gas_totals {
  double mass, energy, momentum[3], momentum_abs;
} gas_totals;

static inline gas_totals global_totals(const element *g, int n) {
  double d[6] = {0, 0, 0, 0, 0, 0}, s[6];
  for (int i = 0; i < n; i++) {
    double v2 = 0;
    for (int a = 0; a < 3; a++) {
      v2 += g[i].vel[a] * g[i].vel[a];
      d[2 + a] += g[i].mass * g[i].vel[a];
      d[5] += g[i].mass * fabs(g[i].vel[a]);
    }
    d[0] += g[i].mass;
    d[1] += g[i].mass * (g[i].energy + 0.5 * v2);
  }
  MPI_Allreduce(d, s, 6, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  gas_totals t = {s[0], s[1], {s[2], s[3], s[4]}, s[5]};
  return t;
}

/* Ledger fields summed over ranks, in a fixed order. */
#define Q 17
static inline void pack_quantities(const ejecta_quantities *q, double *d) {
  d[0] = q->mass;
  for (int s = 0; s < EJECTA_NUM_SPECIES; s++) d[1 + s] = q->species_mass[s];
  for (int a = 0; a < 3; a++) d[13 + a] = q->momentum[a];
  d[16] = q->energy;
}
static inline void unpack_quantities(const double *d, ejecta_quantities *q) {
  q->mass = d[0];
  for (int s = 0; s < EJECTA_NUM_SPECIES; s++) q->species_mass[s] = d[1 + s];
  for (int a = 0; a < 3; a++) q->momentum[a] = d[13 + a];
  q->energy = d[16];
}

/* reduce_ledger sums a ledger over ranks (max for the largest isotropy
 * residual). */
static inline void reduce_ledger(ejecta_ledger *l) {
  double d[3 * Q + 5], dsum[3 * Q + 5];
  pack_quantities(&l->released, d);
  pack_quantities(&l->deposited, d + Q);
  pack_quantities(&l->undeposited, d + 2 * Q);
  d[3 * Q] = l->radiated;
  d[3 * Q + 1] = l->sum_isotropy_residual;
  d[3 * Q + 2] = l->radial_momentum;
  d[3 * Q + 3] = l->momentum_scale;
  d[3 * Q + 4] = l->energy_scale;
  MPI_Allreduce(d, dsum, 3 * Q + 5, MPI_DOUBLE, MPI_SUM, MPI_COMM_WORLD);
  int64_t n[4] = {l->stars, l->skipped, l->capped, l->limited}, nsum[4];
  MPI_Allreduce(n, nsum, 4, MPI_INT64_T, MPI_SUM, MPI_COMM_WORLD);
  double mx;
  MPI_Allreduce(&l->max_isotropy_residual, &mx, 1, MPI_DOUBLE, MPI_MAX, MPI_COMM_WORLD);
  unpack_quantities(dsum, &l->released);
  unpack_quantities(dsum + Q, &l->deposited);
  unpack_quantities(dsum + 2 * Q, &l->undeposited);
  l->radiated = dsum[3 * Q];
  l->sum_isotropy_residual = dsum[3 * Q + 1];
  l->radial_momentum = dsum[3 * Q + 2];
  l->momentum_scale = dsum[3 * Q + 3];
  l->energy_scale = dsum[3 * Q + 4];
  l->stars = nsum[0];
  l->skipped = nsum[1];
  l->capped = nsum[2];
  l->limited = nsum[3];
  l->max_isotropy_residual = mx;
}

/* qsort order of elements by ID. */
static inline int element_by_id(const void *a, const void *b) {
  int64_t x = ((const element *)a)->id, y = ((const element *)b)->id;
  return (x > y) - (x < y);
}

/* gather_gas gathers the own elements of every rank on rank 0, sorted by
 * ID (NULL on other ranks; n_global is the total). */
static inline element *gather_gas(exchange *x, const element *local, int n_own, int n_global) {
  MPI_Gather(&n_own, 1, MPI_INT, x->rcount, 1, MPI_INT, 0, MPI_COMM_WORLD);
  exclusive_sum(x->rcount, x->rdispl, nranks);
  element *all = rank == 0 ? alloc(n_global, sizeof *all) : NULL;
  MPI_Gatherv(local, n_own, x->elem_t, all, x->rcount, x->rdispl, x->elem_t, 0, MPI_COMM_WORLD);
  if (rank == 0) qsort(all, n_global, sizeof *all, element_by_id);
  return all;
}

/* all_ranks_verdict sums the failed checks of every rank; rank 0 prints
 * the verdict. Returns the exit code of every rank. */
static inline int all_ranks_verdict(void) {
  int total;
  MPI_Allreduce(&failures, &total, 1, MPI_INT, MPI_SUM, MPI_COMM_WORLD);
  failures = total;
  if (rank == 0) return verdict();
  return failures ? 1 : 0;
}

/* Writes n items of size bytes to path; 0 on success. */
static inline int write_dump(const char *path, const void *items, size_t size, size_t n) {
  FILE *f = fopen(path, "wb");
  if (!f) return -1;
  int bad = fwrite(items, size, n, f) != n;
  bad |= fclose(f) != 0;
  return bad ? -1 : 0;
}

#endif
