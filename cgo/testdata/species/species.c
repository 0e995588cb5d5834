/*
 * species.c: a host choosing its tracked elements by symbol through the C
 * ABI, naming the species codes back, and seeing a bad list refused.
 * Prints key=value lines; exits non-zero on a failed call.
 */
#include <stdio.h>

#include "ejecta.h"

int main(void) {
  ejecta_config config;
  ejecta_context ctx = 0;
  char text[256];
  if (ejecta_config_defaults(&config) != EJECTA_OK ||
      ejecta_create(&config, &ctx, text, sizeof text) != EJECTA_OK) {
    fprintf(stderr, "create: %s\n", text);
    return 1;
  }
  int32_t count = 0;
  if (ejecta_species_count(ctx, &count) != EJECTA_OK) return 1;
  printf("default_count=%d\n", (int)count);
  if (ejecta_species_symbol(ctx, EJECTA_SPECIES_IRON, text, sizeof text) != EJECTA_OK) return 1;
  printf("default_iron=%s\n", text);
  if (ejecta_choose_species(ctx, "Fe,O,Ni") != EJECTA_OK) return 1;
  if (ejecta_species_count(ctx, &count) != EJECTA_OK) return 1;
  printf("chosen_count=%d\n", (int)count);
  printf("chosen=");
  for (int32_t k = 0; k < count; k++) {
    if (ejecta_species_symbol(ctx, k, text, sizeof text) != EJECTA_OK) return 1;
    printf("%s%s", k ? "," : "", text);
  }
  printf("\n");
  printf("bad_code=%d\n", ejecta_choose_species(ctx, "Fe,Xx"));
  int64_t n = 0;
  ejecta_last_error(ctx, text, sizeof text, &n);
  printf("bad_error=%s\n", text);
  ejecta_destroy(&ctx);
  printf("result pass\n");
  return 0;
}
