/*
 * bench_host.c — times ejecta steps through the C ABI. Gas: N_GAS elements
 * uniformly random in a periodic box (array of structs, float64), stars at
 * random positions, each coupled to its K nearest neighbors. One step is
 * ejecta_step + ejecta_apply_step_records. The set-up matches
 * BenchmarkStepFromGo in cgo/bench_test.go (same hash, same layout).
 *
 * usage: bench_host N_GAS N_STARS K STEPS
 * prints: ns_per_step=... (mean over STEPS steps after one untimed step
 * that builds the neighbor tree)
 */
#define _POSIX_C_SOURCE 199309L
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "ejecta.h"
#include "host_common.h"

typedef struct bench_element {
  double pos[3];
  double vel[3];
  double mass;
  double density;
  double energy;
  double metals;
  int64_t id;
} bench_element;

static ejecta_field col(void *p, int32_t t) { return strided(p, sizeof(bench_element), t); }

int main(int argc, char **argv) {
  if (argc != 5) {
    fprintf(stderr, "usage: bench_host N_GAS N_STARS K STEPS\n");
    return 2;
  }
  int64_t n_gas = atoll(argv[1]), n_stars = atoll(argv[2]);
  int k = atoi(argv[3]), steps = atoi(argv[4]);
  double box = 1.0;
  while (box * box * box < (double)n_gas) box += 1.0; /* ~1 element per pc^3 */
  bench_element *gas = malloc((size_t)n_gas * sizeof *gas);
  for (int64_t i = 0; i < n_gas; i++) {
    for (int a = 0; a < 3; a++) {
      gas[i].pos[a] = box * unit_hash((uint64_t)i, (uint64_t)a);
      gas[i].vel[a] = unit_hash((uint64_t)i, 3 + (uint64_t)a) - 0.5;
    }
    gas[i].mass = 1.0;
    gas[i].density = 1.0;
    gas[i].energy = 100.0;
    gas[i].metals = 0.01;
    gas[i].id = i + 1;
  }
  ejecta_star *stars = calloc((size_t)n_stars, sizeof *stars);
  for (int64_t s = 0; s < n_stars; s++) {
    stars[s].id = s + 1;
    for (int a = 0; a < 3; a++) stars[s].position[a] = box * unit_hash((uint64_t)(n_gas + s), (uint64_t)a);
    stars[s].mass = 100;
    stars[s].metallicity = 0.01;
    stars[s].age = 5;
    stars[s].ejected_mass = 10;
    stars[s].species_mass[EJECTA_SPECIES_METALS] = 2;
    stars[s].energy = FOE_CODE;
    stars[s].events = 1;
  }
  ejecta_config cfg;
  ejecta_config_defaults(&cfg);
  use_host_units(&cfg);
  cfg.neighbor_count = k;
  cfg.worker_threads = 1;
  for (int a = 0; a < 3; a++) cfg.box_size[a] = box;
  ejecta_context ctx = 0;
  char err[256];
  if (ejecta_create(&cfg, &ctx, err, sizeof err) != EJECTA_OK) {
    fprintf(stderr, "FAIL create: %s\n", err);
    return 2;
  }
  ejecta_gas g;
  DESCRIBE_GAS(g, gas, n_gas, EJECTA_FLOAT64);
  int32_t species[1] = {EJECTA_SPECIES_METALS};
  ejecta_field fractions[1] = {col(&gas[0].metals, EJECTA_FLOAT64)};
  g.n_species = 1;
  g.species = species;
  g.species_fraction = fractions;
  must(ctx, ejecta_bind_gas(ctx, &g), "bind");
  /* Untimed first step: builds the tree. */
  must(ctx, ejecta_step(ctx, stars, n_stars, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), "step");
  must(ctx, ejecta_apply_step_records(ctx, NULL), "apply");
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int i = 0; i < steps; i++) {
    must(ctx, ejecta_step(ctx, stars, n_stars, 1 + i, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), "step");
    must(ctx, ejecta_apply_step_records(ctx, NULL), "apply");
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double ns = ((double)(t1.tv_sec - t0.tv_sec) * 1e9 + (double)(t1.tv_nsec - t0.tv_nsec)) / steps;
  ejecta_ledger led;
  must(ctx, ejecta_get_ledger(ctx, &led), "ledger");
  printf("steps=%d stars=%lld records_per_step=%lld ns_per_step=%.0f\n", steps, (long long)led.stars,
         (long long)(n_stars * k), ns);
  ejecta_destroy(&ctx);
  free(gas);
  free(stars);
  return 0;
}
