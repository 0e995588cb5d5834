/*
 * error_codes.c — a C host that provokes every error code ejecta.h
 * documents, through the real exports, and checks that each call returns
 * the code its documentation promises: a NULL pointer, an argument out of
 * range, an unknown name, a dead context, a step before any gas, a NaN
 * release, host neighbor rows shorter than the neighbor count, a short
 * buffer, a record for gas this rank does not hold, calls while another
 * thread's call holds the same context, a gas element whose
 * metal mass fraction is above 1, a tampered ledger, records applied
 * twice, a population step without a population, a missing yields table,
 * an audit dump into a directory that cannot be created,
 * and a gas column the process may not read (a fault in ejecta's worker
 * threads, which must come back as an error, not end the process).
 *
 * For every code it has seen returned as documented it prints
 * "code NAME ok"; then key=value lines with the messages, and
 * "result pass" when every check held. Code units: pc, Msun, km/s.
 */
#define _DEFAULT_SOURCE /* MAP_ANONYMOUS, mkdtemp */
#include <math.h>
#include <pthread.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include "ejecta.h"
#include "host_common.h"

#define SIDE 10 /* gas lattice side */
#define N_GAS (SIDE * SIDE * SIDE)
#define BOX 10.0

typedef struct gas_element {
  double pos[3];
  double vel[3];
  double mass;
  double density;
  double energy;
  double metals;
  int64_t id;
} gas_element;

/* The codes of ejecta.h, to print each one's name once it was seen. */
static const struct {
  int code;
  const char *name;
} codes[] = {
    {EJECTA_OK, "EJECTA_OK"},
    {EJECTA_ERR_NULL_POINTER, "EJECTA_ERR_NULL_POINTER"},
    {EJECTA_ERR_INVALID_ARGUMENT, "EJECTA_ERR_INVALID_ARGUMENT"},
    {EJECTA_ERR_UNKNOWN_NAME, "EJECTA_ERR_UNKNOWN_NAME"},
    {EJECTA_ERR_INVALID_CONTEXT, "EJECTA_ERR_INVALID_CONTEXT"},
    {EJECTA_ERR_NO_GAS, "EJECTA_ERR_NO_GAS"},
    {EJECTA_ERR_BAD_VALUE, "EJECTA_ERR_BAD_VALUE"},
    {EJECTA_ERR_NEIGHBORS, "EJECTA_ERR_NEIGHBORS"},
    {EJECTA_ERR_BUFFER_TOO_SMALL, "EJECTA_ERR_BUFFER_TOO_SMALL"},
    {EJECTA_ERR_UNKNOWN_GAS, "EJECTA_ERR_UNKNOWN_GAS"},
    {EJECTA_ERR_BUSY, "EJECTA_ERR_BUSY"},
    {EJECTA_ERR_UNDEPOSITED, "EJECTA_ERR_UNDEPOSITED"},
    {EJECTA_ERR_IMBALANCE, "EJECTA_ERR_IMBALANCE"},
    {EJECTA_ERR_ALREADY_APPLIED, "EJECTA_ERR_ALREADY_APPLIED"},
    {EJECTA_ERR_NO_POPULATION, "EJECTA_ERR_NO_POPULATION"},
    {EJECTA_ERR_YIELDS_TABLE, "EJECTA_ERR_YIELDS_TABLE"},
    {EJECTA_ERR_REMNANT_TABLE, "EJECTA_ERR_REMNANT_TABLE"},
    {EJECTA_ERR_DUMP_FILE, "EJECTA_ERR_DUMP_FILE"},
    {EJECTA_ERR_INTERNAL, "EJECTA_ERR_INTERNAL"},
};
#define N_CODES (int)(sizeof codes / sizeof codes[0])
static int seen[N_CODES];

/* expect checks that a call returned the code its documentation promises
 * and notes the code as seen. */
#define EXPECT(call, want, ctx, what) expect_code((call), (want), (ctx), (what), __LINE__)
static void expect_code(int got, int want, ejecta_context ctx, const char *what, int line) {
  if (got != want) {
    char msg[512] = "";
    if (ctx) ejecta_last_error(ctx, msg, sizeof msg, NULL);
    fprintf(stderr, "FAIL line %d: %s: code %d, want %d: %s\n", line, what, got, want, msg);
    failures++;
    return;
  }
  for (int i = 0; i < N_CODES; i++)
    if (codes[i].code == want && !seen[i]) {
      seen[i] = 1;
      printf("code %s ok\n", codes[i].name);
    }
}

static ejecta_field field(void *p, int32_t type) { return strided(p, sizeof(gas_element), type); }

static void describe(gas_element *g, int64_t n, ejecta_gas *d, int32_t *species, ejecta_field *fractions) {
  DESCRIBE_GAS(*d, g, n, EJECTA_FLOAT64);
  species[0] = EJECTA_SPECIES_METALS;
  fractions[0] = field(&g[0].metals, EJECTA_FLOAT64);
  d->n_species = 1;
  d->species = species;
  d->species_fraction = fractions;
}

/* A lattice of SIDE^3 elements, n_H ~ 100 cm^-3. */
static gas_element *lattice(void) {
  gas_element *g = calloc(N_GAS, sizeof *g);
  double h = BOX / SIDE;
  for (int i = 0; i < N_GAS; i++) {
    int idx[3] = {i % SIDE, (i / SIDE) % SIDE, i / (SIDE * SIDE)};
    for (int a = 0; a < 3; a++) g[i].pos[a] = (idx[a] + 0.5) * h;
    g[i].density = 3.45;
    g[i].mass = 3.45 * h * h * h;
    g[i].energy = 100;
    g[i].metals = 0.0134;
    g[i].id = 10 + i;
  }
  return g;
}

/* n supernovae spread over the box. */
static ejecta_star *supernovae(int n) {
  ejecta_star *s = calloc((size_t)n, sizeof *s);
  for (int i = 0; i < n; i++) {
    s[i].id = 1 + i;
    for (int a = 0; a < 3; a++) s[i].position[a] = BOX * unit_hash((uint64_t)i, (uint64_t)a);
    s[i].mass = 1e3;
    s[i].metallicity = 0.0134;
    s[i].age = 5;
    s[i].channel = EJECTA_CHANNEL_CORE_COLLAPSE;
    s[i].ejected_mass = 10;
    s[i].species_mass[EJECTA_SPECIES_METALS] = 2;
    s[i].energy = FOE_CODE;
    s[i].events = 1;
  }
  return s;
}

static ejecta_context create(int32_t workers, int32_t neighbors) {
  ejecta_config cfg;
  ejecta_config_defaults(&cfg);
  use_host_units(&cfg);
  cfg.worker_threads = workers;
  cfg.neighbor_count = neighbors;
  for (int a = 0; a < 3; a++) cfg.box_size[a] = BOX;
  char err[256];
  ejecta_context ctx = 0;
  must(0, ejecta_create(&cfg, &ctx, err, sizeof err), "create");
  return ctx;
}

/* A call that holds the context until the host lets it go: enabling a
 * population whose yields table is a named pipe reads the pipe inside the
 * call, with the context held, until the writer closes it. */
typedef struct pipe_holder {
  ejecta_context ctx;
  const char *table;
  int code;
} pipe_holder;

static void *enable_from_pipe(void *arg) {
  pipe_holder *h = arg;
  ejecta_population_config pc;
  ejecta_population_defaults(&pc);
  pc.yields_table = h->table;
  h->code = ejecta_enable_population(h->ctx, &pc);
  return NULL;
}

/* write_table writes a yields table in the documented CSV format: every
 * column the default species set needs, two ages at one metallicity, and
 * nothing released. */
static void write_table(FILE *w) {
  static const char *const channels[] = {"ccsn", "snia", "massive_wind", "agb_wind"};
  static const char *const elements[] = {"z", "h", "he", "c", "n", "o", "ne", "mg", "si", "s", "ca", "fe"};
  int columns = 6;
  fprintf(w, "age[Myr],metallicity[mass_fraction],luminosity[Lsun/Msun],ionizing_rate[photons/s/Msun],"
             "radiant_energy[erg/Msun],ionizing_photons[photons/Msun]");
  for (int c = 0; c < 4; c++) {
    if (c < 2) {
      fprintf(w, ",%s_events[1/Msun]", channels[c]);
      columns++;
    }
    fprintf(w, ",%s_mass[Msun/Msun],%s_energy[erg/Msun]", channels[c], channels[c]);
    columns += 2;
    for (size_t e = 0; e < sizeof elements / sizeof elements[0]; e++) {
      fprintf(w, ",%s_%s[Msun/Msun]", channels[c], elements[e]);
      columns++;
    }
  }
  fprintf(w, "\n");
  for (int row = 0; row < 2; row++) {
    fprintf(w, "%d,0.0134", row == 0 ? 1 : 10);
    for (int k = 2; k < columns; k++) fprintf(w, ",0");
    fprintf(w, "\n");
  }
}

/* busy holds a context in one thread while the main thread calls it:
 * the other thread enables a population from a named pipe, and opening the
 * pipe for writing returns only once that thread has opened it for
 * reading, inside ejecta_enable_population with the context held. Until
 * the table is written and the pipe closed, every call on the context is
 * refused with EJECTA_ERR_BUSY, and nothing it asked for is done. */
static void busy(void) {
  gas_element *g = lattice();
  ejecta_gas d;
  int32_t species[1];
  ejecta_field fractions[1];
  describe(g, N_GAS, &d, species, fractions);
  ejecta_context ctx = create(1, 8);
  must(ctx, ejecta_bind_gas(ctx, &d), "bind");
  ejecta_star *stars = supernovae(4);

  char dir[] = "/tmp/ejecta-busy-XXXXXX", table[64];
  if (!mkdtemp(dir)) {
    fprintf(stderr, "FAIL mkdtemp\n");
    exit(2);
  }
  snprintf(table, sizeof table, "%s/table.csv", dir);
  if (mkfifo(table, 0600) != 0) {
    fprintf(stderr, "FAIL mkfifo %s\n", table);
    exit(2);
  }
  /* A pipe closed early by the reader must come back as a write error. */
  signal(SIGPIPE, SIG_IGN);
  pipe_holder h = {ctx, table, -1};
  pthread_t th;
  if (pthread_create(&th, NULL, enable_from_pipe, &h) != 0) {
    fprintf(stderr, "FAIL pthread_create\n");
    exit(2);
  }
  FILE *w = fopen(table, "w");
  if (!w) {
    fprintf(stderr, "FAIL open %s for writing\n", table);
    exit(2);
  }

  /* The other thread holds the context now. */
  char msg[256] = "";
  int64_t len = 0, count = -1;
  EXPECT(ejecta_last_error(ctx, msg, sizeof msg, &len), EJECTA_ERR_BUSY, 0, "last error while another call holds the context");
  CHECK(strstr(msg, "in use") != NULL, "busy message: %s", msg);
  printf("busy_error=%s\n", msg);
  EXPECT(ejecta_step(ctx, stars, 4, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_BUSY, 0,
         "a step while another call holds the context");
  EXPECT(ejecta_record_count(ctx, &count), EJECTA_ERR_BUSY, 0, "record count while another call holds the context");
  CHECK(count == -1, "a refused call writes nothing: count %lld", (long long)count);

  write_table(w);
  CHECK(fclose(w) == 0, "table written to the pipe");
  pthread_join(th, NULL);
  EXPECT(h.code, EJECTA_OK, ctx, "the population that held the context");

  /* Free again: the refused step did nothing, and now runs. */
  EXPECT(ejecta_record_count(ctx, &count), EJECTA_OK, ctx, "record count once the context is free");
  CHECK(count == 0, "the refused step left no records: %lld", (long long)count);
  EXPECT(ejecta_step(ctx, stars, 4, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_OK, ctx, "a step once the context is free");
  EXPECT(ejecta_record_count(ctx, &count), EJECTA_OK, ctx, "record count after the step");
  CHECK(count > 0, "the step wrote records: %lld", (long long)count);
  unlink(table);
  rmdir(dir);
  ejecta_destroy(&ctx);
  free(stars);
  free(g);
}

int main(void) {
  char msg[512];
  gas_element *g = lattice(), *before = malloc(N_GAS * sizeof *before);
  memcpy(before, g, N_GAS * sizeof *g);
  ejecta_gas d;
  int32_t species[1];
  ejecta_field fractions[1];
  describe(g, N_GAS, &d, species, fractions);
  ejecta_star *stars = supernovae(40);

  /* OK, NULL_POINTER, UNKNOWN_NAME, INVALID_ARGUMENT, REMNANT_TABLE at create. */
  ejecta_config cfg;
  EXPECT(ejecta_config_defaults(&cfg), EJECTA_OK, 0, "defaults");
  EXPECT(ejecta_config_defaults(NULL), EJECTA_ERR_NULL_POINTER, 0, "defaults(NULL)");
  ejecta_context bad = 0;
  snprintf(cfg.scheme, sizeof cfg.scheme, "%s", "wishful-thinking");
  EXPECT(ejecta_create(&cfg, &bad, msg, sizeof msg), EJECTA_ERR_UNKNOWN_NAME, 0, "unknown scheme");
  ejecta_config_defaults(&cfg);
  cfg.worker_threads = -1;
  EXPECT(ejecta_create(&cfg, &bad, msg, sizeof msg), EJECTA_ERR_INVALID_ARGUMENT, 0, "negative workers");
  ejecta_config_defaults(&cfg);
  cfg.remnant_table = "/nonexistent/remnant-table.csv";
  EXPECT(ejecta_create(&cfg, &bad, msg, sizeof msg), EJECTA_ERR_REMNANT_TABLE, 0, "missing remnant table");

  /* INVALID_CONTEXT, NO_GAS, BAD_VALUE, INVALID_ARGUMENT on a context. */
  ejecta_context ctx = create(2, 8);
  int64_t n = 0, written = 0;
  EXPECT(ejecta_record_count(0, &n), EJECTA_ERR_INVALID_CONTEXT, 0, "handle 0");
  EXPECT(ejecta_step(ctx, stars, 1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_NO_GAS, ctx, "step before bind");
  must(ctx, ejecta_bind_gas(ctx, &d), "bind");
  EXPECT(ejecta_step(ctx, stars, 0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_INVALID_ARGUMENT, ctx, "zero stars");
  EXPECT(ejecta_step(ctx, stars, 1, -1, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_INVALID_ARGUMENT, ctx, "negative step index");
  EXPECT(ejecta_apply_step_records(ctx, NULL), EJECTA_ERR_INVALID_ARGUMENT, ctx, "apply before a step");
  ejecta_star nan_star = stars[0];
  nan_star.energy = NAN;
  EXPECT(ejecta_step(ctx, &nan_star, 1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_BAD_VALUE, ctx, "NaN energy");

  /* NEIGHBORS: host rows of 3 candidates with neighbor_count 8 (count
   * mode), and malformed rows; nothing is done either way. */
  int64_t offsets[3] = {0, 3, 6}, indices[6] = {0, 1, 2, 10, 11, 12};
  EXPECT(ejecta_step(ctx, stars, 2, 0, EJECTA_NEIGHBORS_HOST_ROWS, offsets, indices), EJECTA_ERR_NEIGHBORS, ctx, "rows shorter than neighbor_count");
  ejecta_last_error(ctx, msg, sizeof msg, NULL);
  printf("short_rows_error=%s\n", msg);
  EXPECT(ejecta_record_count(ctx, &n), EJECTA_OK, ctx, "count after refused rows");
  CHECK(n == 0, "refused rows left %lld records", (long long)n);
  int64_t backwards[3] = {0, 6, 3};
  EXPECT(ejecta_step(ctx, stars, 2, 0, EJECTA_NEIGHBORS_HOST_ROWS, backwards, indices), EJECTA_ERR_NEIGHBORS, ctx, "decreasing offsets");
  ejecta_context tiny = create(1, 64);
  ejecta_gas few = d;
  few.count = 20;
  must(tiny, ejecta_bind_gas(tiny, &few), "bind 20 elements");
  EXPECT(ejecta_step(tiny, stars, 1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_NEIGHBORS, tiny, "gas smaller than neighbor_count");
  ejecta_destroy(&tiny);

  /* A step that works; BUFFER_TOO_SMALL (copy rule and text),
   * ALREADY_APPLIED, UNKNOWN_GAS, IMBALANCE. */
  EXPECT(ejecta_step(ctx, stars, 4, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_OK, ctx, "step");
  must(ctx, ejecta_record_count(ctx, &n), "count");
  ejecta_record rec[1];
  EXPECT(ejecta_copy_records(ctx, rec, 1, &written), EJECTA_ERR_BUFFER_TOO_SMALL, ctx, "one-record buffer");
  CHECK(written == n && n == 4 * 8, "short buffer: written %lld, records %lld", (long long)written, (long long)n);
  EXPECT(ejecta_copy_records(ctx, NULL, 0, &written), EJECTA_ERR_BUFFER_TOO_SMALL, ctx, "count by capacity 0");
  CHECK(written == n, "capacity 0: written %lld", (long long)written);
  ejecta_ledger led;
  must(ctx, ejecta_get_ledger(ctx, &led), "ledger");
  EXPECT(ejecta_ledger_balanced(&led, 1e-12, msg, sizeof msg), EJECTA_OK, 0, "balanced ledger");
  led.deposited.energy *= 1.5;
  EXPECT(ejecta_ledger_balanced(&led, 1e-12, msg, sizeof msg), EJECTA_ERR_IMBALANCE, 0, "tampered ledger");
  EXPECT(ejecta_apply_step_records(ctx, NULL), EJECTA_OK, ctx, "apply");
  EXPECT(ejecta_apply_step_records(ctx, NULL), EJECTA_ERR_ALREADY_APPLIED, ctx, "apply twice");
  ejecta_record stranger;
  memset(&stranger, 0, sizeof stranger);
  stranger.gas_id = 999999;
  EXPECT(ejecta_apply_records(ctx, &stranger, 1, EJECTA_LOCATE_BY_ID, NULL), EJECTA_ERR_UNKNOWN_GAS, ctx, "unknown gas ID");
  char tiny_buf[8];
  int64_t len = 0;
  EXPECT(ejecta_last_error(ctx, tiny_buf, sizeof tiny_buf, &len), EJECTA_ERR_BUFFER_TOO_SMALL, ctx, "short text buffer");
  CHECK(len > (int64_t)sizeof tiny_buf && tiny_buf[sizeof tiny_buf - 1] == 0, "text truncated to fit, full length %lld", (long long)len);

  /* UNDEPOSITED: a neighbor whose metal mass fraction is above 1 is not
   * deposited into; the star keeps its release. */
  memcpy(g, before, N_GAS * sizeof *g);
  must(ctx, ejecta_bind_gas(ctx, &d), "rebind");
  ejecta_star one = stars[0];
  for (int a = 0; a < 3; a++) one.position[a] = g[555].pos[a] + 0.1;
  g[555].metals = 1.5;
  memcpy(before, g, N_GAS * sizeof *g);
  EXPECT(ejecta_step(ctx, &one, 1, 1, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_UNDEPOSITED, ctx, "metal fraction 1.5");
  ejecta_last_error(ctx, msg, sizeof msg, NULL);
  printf("fraction_error=%s\n", msg);
  int64_t returned = 0;
  EXPECT(ejecta_copy_undeposited(ctx, &returned, NULL, 1, &written), EJECTA_OK, ctx, "undeposited list");
  CHECK(written == 1 && returned == one.id, "undeposited: %lld entries, star %lld", (long long)written, (long long)returned);
  must(ctx, ejecta_get_ledger(ctx, &led), "ledger");
  CHECK(led.undeposited.mass == one.ejected_mass && led.deposited.mass == 0, "the release stays with the star");
  EXPECT(ejecta_apply_step_records(ctx, NULL), EJECTA_OK, ctx, "apply nothing");
  CHECK(memcmp(g, before, N_GAS * sizeof *g) == 0, "no element changed");
  g[555].metals = 0.0134;

  /* NO_POPULATION, YIELDS_TABLE. */
  ejecta_star_particle sp;
  memset(&sp, 0, sizeof sp);
  sp.id = 1;
  sp.mass = sp.formed_mass = 1e4;
  sp.metallicity = 0.0134;
  EXPECT(ejecta_step_population(ctx, &sp, 1, 0.5, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_NO_POPULATION, ctx, "no population");
  ejecta_population_config pc;
  ejecta_population_defaults(&pc);
  pc.yields_table = "/nonexistent/table.csv";
  EXPECT(ejecta_enable_population(ctx, &pc), EJECTA_ERR_YIELDS_TABLE, ctx, "missing table");

  /* DUMP_FILE: an audit dump into a directory that cannot be created. */
  ejecta_dump dump = 0;
  EXPECT(ejecta_dump_open("/dev/null/dump", NULL, NULL, &dump, msg, sizeof msg), EJECTA_ERR_DUMP_FILE, 0, "unwritable dump directory");
  CHECK(dump == 0, "no session after a failed open");

  /* INVALID_CONTEXT on a destroyed context. */
  ejecta_context stale = ctx;
  must(ctx, ejecta_destroy(&ctx), "destroy");
  EXPECT(ejecta_last_error(stale, msg, sizeof msg, NULL), EJECTA_ERR_INVALID_CONTEXT, 0, "destroyed context");

  /* BUSY: another thread's call holds the context. */
  busy();

  /* INTERNAL: a mass column the process may not read, read by ejecta's
   * four worker threads. The fault comes back as a code and the process
   * goes on. */
  size_t bytes = N_GAS * sizeof(double);
  void *forbidden = mmap(NULL, bytes, PROT_NONE, MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
  if (forbidden == MAP_FAILED) {
    fprintf(stderr, "FAIL mmap\n");
    return 2;
  }
  ejecta_gas faulty = d;
  faulty.mass = (ejecta_field){forbidden, sizeof(double), EJECTA_FLOAT64, 0};
  ejecta_context workers = create(4, 8);
  must(workers, ejecta_bind_gas(workers, &faulty), "bind faulty gas");
  EXPECT(ejecta_step(workers, stars, 40, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), EJECTA_ERR_INTERNAL, workers, "unreadable mass column");
  ejecta_last_error(workers, msg, sizeof msg, NULL);
  printf("internal_error=%s\n", msg);
  EXPECT(ejecta_record_count(workers, &n), EJECTA_OK, workers, "count after the fault");
  CHECK(n == 0, "a failed step keeps no records: %lld", (long long)n);
  must(workers, ejecta_destroy(&workers), "destroy after the fault");
  munmap(forbidden, bytes);

  int missing = 0;
  for (int i = 0; i < N_CODES; i++)
    if (!seen[i]) {
      fprintf(stderr, "FAIL code %s never provoked\n", codes[i].name);
      missing++;
    }
  failures += missing;
  free(g);
  free(before);
  free(stars);
  return verdict();
}
