/*
 * audit_host.c — a C host that injects supernova feedback with its OWN
 * code (no ejecta step) and writes the step for the conservation audit
 * through the ejecta_dump_* calls, from the same column descriptors it
 * would bind its gas with.
 *
 * The gas is a lattice of cells (array of structs: float32 positions,
 * float64 velocities, masses, specific internal energies, and the mass
 * fractions of all metals, oxygen and iron; the host tracks the species
 * set "O,Fe"). Three moving stars each release ejecta mass, metals,
 * oxygen, iron and 1e51 erg into every cell within their reach, with equal
 * weights: the ejecta carry the star's velocity, each cell gets a radial
 * kick from which the weighted mean direction is removed (so the kicks sum
 * to zero in the star's frame), a tenth of the energy is booked as
 * radiated, and what is left after the kinetic energy the kicks gave is
 * shared out as heat. Two of the stars share cells. This is a deliberately
 * conservative scheme: the audit passes it.
 *
 * Usage: audit_host DIR [lose-mass]
 *
 * DIR receives the dump (DIR/manifest.json). With "lose-mass" the host
 * plants a bookkeeping error: after the injection one cell near the first
 * star is left with nine tenths of the mass it had before the step, and
 * the host prints its ID (planted_id=...), which the audit must name.
 *
 * The host also calls the dump functions wrongly on purpose and prints the
 * messages as key=value lines (*_error=...): an unwritable directory, an
 * unknown element, a NULL descriptor, a bad stride, calls out of order, a
 * gas count that changed, a NaN release, a closed session. It ends with
 * "result pass" when every call returned what ejecta.h documents. Code
 * units: pc, Msun, km/s.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ejecta.h"
#include "host_common.h"

#define SIDE 10 /* cells per lattice side, 1 pc apart */
#define N_CELLS (SIDE * SIDE * SIDE)
#define N_STARS 3
/* The dump's species set and the codes of its species. */
#define SPECIES_SET "O,Fe"
#define CODE_METALS 0
#define CODE_OXYGEN 1
#define CODE_IRON 2

typedef struct cell {
  float pos[3];
  double vel[3];
  double mass;
  double u; /* specific internal energy */
  double metals, oxygen, iron; /* mass fractions */
  int64_t id;
} cell;

/* A star and what the host's scheme released from it this step. */
typedef struct source {
  int64_t id;
  double pos[3], vel[3];
  double radius; /* reach of the injection */
  double ejecta_mass, metals, oxygen, iron;
  double energy;   /* released, star frame */
  double radiated; /* booked as lost */
} source;

static cell *lattice(void) {
  cell *g = calloc(N_CELLS, sizeof *g);
  for (int i = 0; i < N_CELLS; i++) {
    int idx[3] = {i % SIDE, (i / SIDE) % SIDE, i / (SIDE * SIDE)};
    for (int a = 0; a < 3; a++) {
      g[i].pos[a] = (float)(idx[a] + 0.5);
      g[i].vel[a] = 2 * (unit_hash((uint64_t)i, (uint64_t)a) - 0.5); /* km/s */
    }
    g[i].mass = 3.45; /* n_H ~ 100 cm^-3 */
    g[i].u = 100;
    g[i].metals = 0.0134;
    g[i].oxygen = 0.0057;
    g[i].iron = 0.0013;
    g[i].id = 1000 + 7 * i;
  }
  return g;
}

/* The ejecta_gas of the cells, as the host would bind it. */
static void describe_gas(cell *g, int64_t n, ejecta_gas *d, int32_t species[3], ejecta_field fractions[3]) {
  size_t s = sizeof(cell);
  memset(d, 0, sizeof *d);
  d->count = n;
  for (int a = 0; a < 3; a++) {
    d->position[a] = strided(&g[0].pos[a], s, EJECTA_FLOAT32);
    d->velocity[a] = strided(&g[0].vel[a], s, EJECTA_FLOAT64);
  }
  d->mass = strided(&g[0].mass, s, EJECTA_FLOAT64);
  d->internal_energy = strided(&g[0].u, s, EJECTA_FLOAT64);
  d->id = strided(&g[0].id, s, EJECTA_INT64);
  /* density is not part of a dump: left NULL */
  species[0] = CODE_METALS;
  species[1] = CODE_OXYGEN;
  species[2] = CODE_IRON;
  fractions[0] = strided(&g[0].metals, s, EJECTA_FLOAT64);
  fractions[1] = strided(&g[0].oxygen, s, EJECTA_FLOAT64);
  fractions[2] = strided(&g[0].iron, s, EJECTA_FLOAT64);
  d->n_species = 3;
  d->species = species;
  d->species_fraction = fractions;
}

/* The ejecta_star_columns of the sources. */
static void describe_stars(source *st, int64_t n, ejecta_star_columns *d, int32_t species[3], ejecta_field masses[3]) {
  size_t s = sizeof(source);
  memset(d, 0, sizeof *d);
  d->count = n;
  d->id = strided(&st[0].id, s, EJECTA_INT64);
  for (int a = 0; a < 3; a++) {
    d->position[a] = strided(&st[0].pos[a], s, EJECTA_FLOAT64);
    d->velocity[a] = strided(&st[0].vel[a], s, EJECTA_FLOAT64);
  }
  d->coupling_radius = strided(&st[0].radius, s, EJECTA_FLOAT64);
  d->ejecta_mass = strided(&st[0].ejecta_mass, s, EJECTA_FLOAT64);
  d->energy = strided(&st[0].energy, s, EJECTA_FLOAT64);
  d->radiated = strided(&st[0].radiated, s, EJECTA_FLOAT64);
  species[0] = CODE_METALS;
  species[1] = CODE_OXYGEN;
  species[2] = CODE_IRON;
  masses[0] = strided(&st[0].metals, s, EJECTA_FLOAT64);
  masses[1] = strided(&st[0].oxygen, s, EJECTA_FLOAT64);
  masses[2] = strided(&st[0].iron, s, EJECTA_FLOAT64);
  d->n_species = 3;
  d->species = species;
  d->species_mass = masses;
}

/* inject is the host's own feedback: star by star, every cell within
 * reach gets an equal share of the ejecta (moving with the star), a kick
 * along its direction from the star less the mean direction, and heat that
 * closes the energy budget. It returns 0, or -1 when the budget cannot
 * pay for the kicks. */
static int inject(cell *g, const source *s) {
  int nb[N_CELLS];
  double dir[N_CELLS][3];
  int n = 0;
  double net[3] = {0, 0, 0}, swept = 0;
  for (int i = 0; i < N_CELLS; i++) {
    double d[3], r2 = 0;
    for (int a = 0; a < 3; a++) {
      d[a] = (double)g[i].pos[a] - s->pos[a];
      r2 += d[a] * d[a];
    }
    if (r2 > s->radius * s->radius || r2 == 0) continue;
    double r = sqrt(r2);
    for (int a = 0; a < 3; a++) dir[n][a] = d[a] / r;
    nb[n++] = i;
    swept += g[i].mass;
  }
  if (n == 0) return -1;
  double w = 1.0 / n;
  for (int k = 0; k < n; k++)
    for (int a = 0; a < 3; a++) net[a] += w * dir[k][a];
  /* Kicks worth about 30% of the energy if the gas were at rest. */
  double kick = sqrt(2 * 0.3 * s->energy * swept);
  double budget = s->energy - s->radiated, dk = 0;
  double v2 = 0;
  for (int a = 0; a < 3; a++) v2 += s->vel[a] * s->vel[a];
  budget += 0.5 * s->ejecta_mass * v2;
  double newp[N_CELLS][3], newm[N_CELLS];
  for (int k = 0; k < n; k++) {
    cell *c = &g[nb[k]];
    double p2 = 0, q2 = 0;
    newm[k] = c->mass + w * s->ejecta_mass;
    for (int a = 0; a < 3; a++) {
      double p = c->mass * c->vel[a];
      newp[k][a] = p + w * s->ejecta_mass * s->vel[a] + w * kick * (dir[k][a] - net[a]);
      p2 += p * p;
      q2 += newp[k][a] * newp[k][a];
    }
    dk += q2 / (2 * newm[k]) - p2 / (2 * c->mass);
  }
  double heat = budget - dk;
  if (!(heat > 0)) return -1;
  for (int k = 0; k < n; k++) {
    cell *c = &g[nb[k]];
    double m = c->mass, m1 = newm[k];
    c->metals = (m * c->metals + w * s->metals) / m1;
    c->oxygen = (m * c->oxygen + w * s->oxygen) / m1;
    c->iron = (m * c->iron + w * s->iron) / m1;
    c->u = (m * c->u + w * heat) / m1;
    for (int a = 0; a < 3; a++) c->vel[a] = newp[k][a] / m1;
    c->mass = m1;
  }
  return 0;
}

/* must_dump stops the host when a dump call that has to succeed fails. */
static void must_dump(ejecta_dump d, int code, const char *what) {
  if (code == EJECTA_OK) return;
  char msg[512] = "";
  if (d) ejecta_dump_last_error(d, msg, sizeof msg, NULL);
  fprintf(stderr, "FAIL %s: code %d: %s\n", what, code, msg);
  HOST_ABORT();
}

/* expect checks a call's code and prints the session's message under key. */
static void expect(ejecta_dump d, int got, int want, const char *key) {
  char msg[512] = "";
  if (d) ejecta_dump_last_error(d, msg, sizeof msg, NULL);
  CHECK(got == want, "%s: code %d, want %d: %s", key, got, want, msg);
  printf("%s_error=%s\n", key, msg);
}

int main(int argc, char **argv) {
  if (argc < 2) {
    fprintf(stderr, "usage: audit_host DIR [lose-mass]\n");
    return 2;
  }
  const char *dir = argv[1];
  int plant = argc > 2 && strcmp(argv[2], "lose-mass") == 0;

  cell *g = lattice();
  source stars[N_STARS] = {
      /* id, position, velocity, reach, ejecta mass, metals, O, Fe,
       * energy 1e51 erg, radiated a tenth of it */
      {11, {3, 3, 3}, {20, -10, 5}, 2.0, 10, 2, 1, 0.1, FOE_CODE, 0.1 * FOE_CODE},
      {12, {3, 3, 6}, {-15, 0, 30}, 2.0, 8, 1.5, 0.7, 0.09, FOE_CODE, 0.1 * FOE_CODE},
      {13, {7, 7, 7}, {0, 25, 0}, 2.0, 12, 2.5, 1.2, 0.12, FOE_CODE, 0.1 * FOE_CODE},
  };
  int32_t gas_species[3], star_species[3];
  ejecta_field fractions[3], masses[3];
  ejecta_gas gas;
  describe_gas(g, N_CELLS, &gas, gas_species, fractions);
  ejecta_star_columns sc;
  describe_stars(stars, N_STARS, &sc, star_species, masses);

  /* Opening: what a bad directory or species list gives. */
  char why[512];
  ejecta_dump d = 0;
  double open_box[3] = {0, 0, 0};
  int rc = ejecta_dump_open("/dev/null/dump", SPECIES_SET, open_box, &d, why, sizeof why);
  CHECK(rc == EJECTA_ERR_DUMP_FILE && d == 0, "unwritable directory: code %d", rc);
  printf("directory_error=%s\n", why);
  rc = ejecta_dump_open(dir, "O,Xx", NULL, &d, why, sizeof why);
  CHECK(rc == EJECTA_ERR_INVALID_ARGUMENT, "unknown element: code %d", rc);
  printf("species_error=%s\n", why);
  rc = ejecta_dump_open(NULL, NULL, NULL, &d, why, sizeof why);
  CHECK(rc == EJECTA_ERR_NULL_POINTER, "NULL directory: code %d", rc);

  must_dump(0, ejecta_dump_open(dir, SPECIES_SET, open_box, &d, why, sizeof why), why);

  /* Wrong calls on the session change nothing. */
  expect(d, ejecta_dump_gas_after(d, &gas), EJECTA_ERR_INVALID_ARGUMENT, "order");
  expect(d, ejecta_dump_gas_before(d, NULL), EJECTA_ERR_NULL_POINTER, "null_gas");
  ejecta_gas bad = gas;
  bad.mass.stride = 4;
  expect(d, ejecta_dump_gas_before(d, &bad), EJECTA_ERR_INVALID_ARGUMENT, "stride");
  bad = gas;
  bad.internal_energy.data = NULL;
  expect(d, ejecta_dump_gas_before(d, &bad), EJECTA_ERR_NULL_POINTER, "null_column");
  expect(d, ejecta_dump_finish(d), EJECTA_ERR_INVALID_ARGUMENT, "incomplete");

  /* The step: the gas before, the host's own feedback, the gas after. */
  must_dump(d, ejecta_dump_gas_before(d, &gas), "gas before");
  double mass_before = 0;
  for (int i = 0; i < N_CELLS; i++) mass_before += g[i].mass;
  double planted_mass = 0;
  int planted = -1;
  for (int s = 0; s < N_STARS; s++) CHECK(inject(g, &stars[s]) == 0, "star %d: the budget cannot pay for the kicks", s);
  if (plant) {
    /* A cell next to the first star loses a tenth of the mass it had before
     * the step: the kind of slip the audit exists to catch. */
    for (int i = 0; i < N_CELLS && planted < 0; i++)
      if (fabs(g[i].pos[0] - 2.5) < 0.01 && fabs(g[i].pos[1] - 2.5) < 0.01 && fabs(g[i].pos[2] - 2.5) < 0.01) planted = i;
    planted_mass = g[planted].mass;
    g[planted].mass = 0.9 * 3.45;
    printf("planted_id=%lld\n", (long long)g[planted].id);
  }

  bad = gas;
  bad.count = N_CELLS - 1;
  expect(d, ejecta_dump_gas_after(d, &bad), EJECTA_ERR_INVALID_ARGUMENT, "count");
  must_dump(d, ejecta_dump_gas_after(d, &gas), "gas after");

  source nan_star = stars[0];
  nan_star.energy = NAN;
  ejecta_star_columns nan_columns;
  int32_t nan_species[3];
  ejecta_field nan_masses[3];
  describe_stars(&nan_star, 1, &nan_columns, nan_species, nan_masses);
  expect(d, ejecta_dump_stars(d, &nan_columns), EJECTA_ERR_BAD_VALUE, "nan");

  must_dump(d, ejecta_dump_stars(d, &sc), "stars");
  must_dump(d, ejecta_dump_finish(d), "finish");
  expect(d, ejecta_dump_gas_before(d, &gas), EJECTA_ERR_INVALID_ARGUMENT, "finished");
  ejecta_dump closed = d;
  must_dump(d, ejecta_dump_close(&d), "close");
  CHECK(d == 0, "close sets the handle to 0");
  char msg[512] = "";
  rc = ejecta_dump_last_error(closed, msg, sizeof msg, NULL);
  CHECK(rc == EJECTA_ERR_INVALID_CONTEXT, "closed session: code %d", rc);
  printf("closed_error=%s\n", msg);
  CHECK(ejecta_dump_close(&d) == EJECTA_OK, "closing 0 is a no-op");

  /* The host's own sums, for the test to compare with the audit's. */
  double released = 0, mass_after = 0;
  for (int s = 0; s < N_STARS; s++) released += stars[s].ejecta_mass;
  for (int i = 0; i < N_CELLS; i++) mass_after += g[i].mass;
  printf("released_mass=%.17g gas_mass_gain=%.17g\n", released, mass_after - mass_before);
  if (plant) printf("planted_loss=%.17g\n", planted_mass - g[planted].mass);
  printf("dump=%s/manifest.json\n", dir);
  free(g);
  return verdict();
}
