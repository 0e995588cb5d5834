/*
 * mpi_common.h — what the MPI example hosts share: the array-of-structs
 * gas element they decompose, the rank globals and error exit, a
 * deterministic hash for placing gas and stars, the slab owner of a
 * position, the field descriptor of an element column, and the sum of a
 * ledger over ranks (MPI_Allreduce in a fixed field order).
 *
 * Include after <mpi.h>, "ejecta.h" and a definition of BOX (the periodic
 * box side in pc).
 */
#ifndef EJECTA_MPI_COMMON_H
#define EJECTA_MPI_COMMON_H

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

static int rank, nranks;

static void die(const char *what, ejecta_context ctx, int code) {
  char msg[512] = "";
  if (ctx) ejecta_last_error(ctx, msg, sizeof msg, NULL);
  fprintf(stderr, "FAIL rank %d: %s: code %d: %s\n", rank, what, code, msg);
  MPI_Abort(MPI_COMM_WORLD, 2);
}

/* A counter-based hash in [0, 1): the same value for the same (i, k) on
 * every rank. */
static double unit_hash(uint64_t i, uint64_t k) {
  uint64_t z = i * 0x9E3779B97F4A7C15ull + k * 0xBF58476D1CE4E5B9ull + 0x94D049BB133111EBull;
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
  z ^= z >> 31;
  return (double)(z >> 11) / 9007199254740992.0;
}

/* The rank whose slab of x holds x. */
static int owner_of(double x) {
  int r = (int)floor(x / (BOX / nranks));
  if (r < 0) r = 0;
  if (r >= nranks) r = nranks - 1;
  return r;
}

/* The descriptor of one element field at p. */
static ejecta_field col(void *p, int32_t type) {
  ejecta_field f = {p, (int64_t)sizeof(element), type, 0};
  return f;
}

static void exclusive_sum(const int *counts, int *displs, int n) {
  displs[0] = 0;
  for (int i = 1; i < n; i++) displs[i] = displs[i - 1] + counts[i - 1];
}

/* Ledger fields summed over ranks, in a fixed order. */
#define Q 17
static void pack_quantities(const ejecta_quantities *q, double *d) {
  d[0] = q->mass;
  for (int s = 0; s < EJECTA_NUM_SPECIES; s++) d[1 + s] = q->species_mass[s];
  for (int a = 0; a < 3; a++) d[13 + a] = q->momentum[a];
  d[16] = q->energy;
}
static void unpack_quantities(const double *d, ejecta_quantities *q) {
  q->mass = d[0];
  for (int s = 0; s < EJECTA_NUM_SPECIES; s++) q->species_mass[s] = d[1 + s];
  for (int a = 0; a < 3; a++) q->momentum[a] = d[13 + a];
  q->energy = d[16];
}

static void reduce_ledger(ejecta_ledger *l) {
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
static int element_by_id(const void *a, const void *b) {
  int64_t x = ((const element *)a)->id, y = ((const element *)b)->id;
  return (x > y) - (x < y);
}

#endif
