/*
 * areal-native: the release module translated to C by wasm2c, driven from the command line.
 * Built by `npm run build:native` (scripts/build-native.mjs), which generates `areal_table.h` beside the
 * translated module: the export table (name, parameter types, a trampoline) and the routine table of
 * harness/routines.ts (CSV column names) with the status words of harness/status.ts.
 *
 *   areal-native list                      one line per kernel export: name, parameter types
 *   areal-native eval ROUTINE [FILE]       the CSV `areal eval` reads (stdin when no FILE), the CSV it writes
 *   areal-native serve [IN OUT]            binary call protocol for the harness (stdin/stdout when no paths):
 *        request  u32 export index, u32 argument count, that many f64 arguments (little-endian)
 *        response i32 status, u32 slot count (64), 64 f64 output slots
 *        an export index of 0xffffffff ends the session.
 *
 * Plain C99. Compiled with -ffp-contract=off: contracting a * b + c into a fused multiply-add rounds once
 * instead of twice, which changes result bits and breaks bit-identity with the WebAssembly module.
 */
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "areal.h"
#include "areal_table.h"

#define OUT_SLOTS 64
#define MAX_ARGS 32
#define MAX_COLS 256
#define LINE_MAX_BYTES 65536

static Z_areal_instance_t instance;

static void fail(const char *msg, const char *arg) {
  fprintf(stderr, "areal-native: %s%s\n", msg, arg ? arg : "");
  exit(2);
}

/* Output slot i as a double (the module's reals are 8 or 4 bytes). */
static double slot(int i) {
  wasm_rt_memory_t *mem = Z_arealZ_memory(&instance);
  uint32_t base = Z_arealZ_areal_out(&instance);
  uint32_t rb = Z_arealZ_areal_real_bytes(&instance);
  if ((uint64_t)base + (uint64_t)OUT_SLOTS * rb > mem->size) fail("areal_out() points outside memory", NULL);
  if (rb == 8) {
    double v;
    memcpy(&v, mem->data + base + 8u * (uint32_t)i, 8);
    return v;
  } else {
    float v;
    memcpy(&v, mem->data + base + 4u * (uint32_t)i, 4);
    return (double)v;
  }
}

static int find_export(const char *name) {
  int i;
  for (i = 0; i < AREAL_N_EXPORTS; i++) if (strcmp(AREAL_EXPORTS[i].name, name) == 0) return i;
  return -1;
}

/* ---- list ---- */
static int cmd_list(void) {
  int i, j;
  for (i = 0; i < AREAL_N_EXPORTS; i++) {
    printf("%s", AREAL_EXPORTS[i].name);
    for (j = 0; j < AREAL_EXPORTS[i].nparams; j++) printf(" %s", AREAL_EXPORTS[i].params[j] == 'i' ? "i32" : AREAL_EXPORTS[i].params[j] == 'f' ? "f32" : "f64");
    printf("\n");
  }
  return 0;
}

/* ---- serve ---- */
static int read_all(FILE *f, void *buf, size_t n) {
  return fread(buf, 1, n, f) == n;
}

static int cmd_serve(const char *in_path, const char *out_path) {
  FILE *in = in_path ? fopen(in_path, "rb") : stdin;
  FILE *out;
  uint32_t head[2];
  double args[MAX_ARGS];
  unsigned char resp[8 + 8 * OUT_SLOTS];
  if (!in) fail("cannot open ", in_path);
  out = out_path ? fopen(out_path, "wb") : stdout;
  if (!out) fail("cannot open ", out_path);
  while (read_all(in, head, sizeof head)) {
    int32_t status;
    uint32_t n = OUT_SLOTS, i;
    if (head[0] == 0xffffffffu) break;
    if (head[1] > MAX_ARGS || !read_all(in, args, 8u * head[1])) fail("truncated or oversized request", NULL);
    if (head[0] >= (uint32_t)AREAL_N_EXPORTS || (int)head[1] != AREAL_EXPORTS[head[0]].nparams) {
      status = -1; /* bad request: unknown export or wrong argument count */
      memset(resp, 0, sizeof resp);
    } else {
      status = AREAL_EXPORTS[head[0]].call(&instance, args);
      for (i = 0; i < OUT_SLOTS; i++) {
        double v = slot((int)i);
        memcpy(resp + 8 + 8 * i, &v, 8);
      }
    }
    memcpy(resp, &status, 4);
    memcpy(resp + 4, &n, 4);
    if (fwrite(resp, 1, sizeof resp, out) != sizeof resp) fail("write failed", NULL);
    fflush(out);
  }
  if (in_path) fclose(in);
  if (out_path) fclose(out);
  return 0;
}

/* ---- eval: the same CSV as `areal eval` ---- */

/* JavaScript's Number.prototype.toString for a double: the fewest significant digits that read back to the same
 * value (the closest such string when several have that length), laid out as JavaScript does. The correctly
 * rounded p-digit string is tried first, then its neighbour on the value's side: the shortest string that reads
 * back is not always the correctly rounded one. */
static void js_number(double x, char *buf) {
  char tmp[48], digits[24];
  unsigned long long m = 0;
  int p, k, n, e = 0, i, found = 0;
  double ax = fabs(x);
  if (isnan(x)) { strcpy(buf, "NaN"); return; }
  if (isinf(x)) { strcpy(buf, x < 0 ? "-Infinity" : "Infinity"); return; }
  if (x == 0) { strcpy(buf, signbit(x) ? "-0" : "0"); return; }
  for (p = 0; p < 17 && !found; p++) {
    char *s;
    snprintf(tmp, sizeof tmp, "%.*e", p, ax);
    m = 0;
    for (s = tmp; *s && *s != 'e'; s++) if (*s >= '0' && *s <= '9') m = m * 10u + (unsigned long long)(*s - '0');
    e = atoi(s + 1) - p; /* value = m * 10^e */
    if (strtod(tmp, NULL) == ax) { found = 1; break; }
    {
      unsigned long long c = strtod(tmp, NULL) < ax ? m + 1u : m - 1u;
      if (c > 0) {
        snprintf(tmp, sizeof tmp, "%llue%d", c, e);
        if (strtod(tmp, NULL) == ax) { m = c; found = 1; break; }
      }
    }
  }
  while (m % 10u == 0) { m /= 10u; e++; }
  k = snprintf(digits, sizeof digits, "%llu", m);
  n = k + e; /* value = 0.d1d2...dk * 10^n */
  if (x < 0) *buf++ = '-';
  if (k <= n && n <= 21) {
    memcpy(buf, digits, (size_t)k);
    for (i = k; i < n; i++) buf[i] = '0';
    buf[n] = 0;
  } else if (0 < n && n <= 21) {
    memcpy(buf, digits, (size_t)n);
    buf[n] = '.';
    strcpy(buf + n + 1, digits + n);
  } else if (-6 < n && n <= 0) {
    buf[0] = '0';
    buf[1] = '.';
    for (i = 0; i < -n; i++) buf[2 + i] = '0';
    strcpy(buf + 2 - n, digits);
  } else {
    buf[0] = digits[0];
    i = 1;
    if (k > 1) { buf[i++] = '.'; memcpy(buf + i, digits + 1, (size_t)k - 1); i += k - 1; }
    sprintf(buf + i, "e%c%d", n - 1 >= 0 ? '+' : '-', n - 1 >= 0 ? n - 1 : 1 - n);
  }
}

static const char *status_word(int32_t code, char *buf) {
  int i;
  for (i = 0; i < AREAL_N_STATUS; i++) if (AREAL_STATUS[i].code == code) return AREAL_STATUS[i].word;
  sprintf(buf, "status-%d", (int)code);
  return buf;
}

/* Parse a cell as `areal eval` does: decimal, nan, inf, -inf, or 0x + 16 hex digits (a bit pattern). */
static int parse_cell(const char *c, double *v) {
  char *end;
  size_t len = strlen(c);
  if (len == 18 && c[0] == '0' && c[1] == 'x') {
    uint64_t b = 0;
    size_t i;
    for (i = 2; i < 18; i++) {
      int h = c[i];
      b <<= 4;
      if (h >= '0' && h <= '9') b |= (uint64_t)(h - '0');
      else if (h >= 'a' && h <= 'f') b |= (uint64_t)(h - 'a' + 10);
      else if (h >= 'A' && h <= 'F') b |= (uint64_t)(h - 'A' + 10);
      else return 0;
    }
    memcpy(v, &b, 8);
    return 1;
  }
  if (len == 0) return 0;
  if (c[0] == 'x' || c[0] == 'X' || strchr(c, 'x') || strchr(c, 'X') || strchr(c, 'p')) return 0;
  *v = strtod(c, &end);
  return *end == 0;
}

static char *trim(char *s) {
  char *e;
  while (*s == ' ' || *s == '\t') s++;
  e = s + strlen(s);
  while (e > s && (e[-1] == ' ' || e[-1] == '\t' || e[-1] == '\r' || e[-1] == '\n')) *--e = 0;
  return s;
}

static int split(char *line, char **cells) {
  int n = 0;
  char *p = line;
  for (;;) {
    char *c = strchr(p, ',');
    if (n >= MAX_COLS) fail("too many columns", NULL);
    if (c) *c = 0;
    cells[n++] = trim(p);
    if (!c) break;
    p = c + 1;
  }
  return n;
}

static int cmd_eval(const char *name, const char *path) {
  static char line[LINE_MAX_BYTES], hdr[LINE_MAX_BYTES];
  char *cols[MAX_COLS], *cells[MAX_COLS], num[40], sw[32];
  int ncols = 0, ri, i, j, lineno = 0, header_done = 0, colof[MAX_ARGS], ex;
  const areal_routine_t *r = NULL;
  FILE *in = path ? fopen(path, "r") : stdin;
  double args[MAX_ARGS];
  for (ri = 0; ri < AREAL_N_ROUTINES; ri++) if (strcmp(AREAL_ROUTINES[ri].name, name) == 0) r = &AREAL_ROUTINES[ri];
  if (!r) fail("unknown routine ", name);
  ex = find_export(r->export_name);
  if (ex < 0) fail("the module has no export for routine ", name);
  if (!in) fail("cannot open ", path);
  while (fgets(line, sizeof line, in)) {
    char *t;
    lineno++;
    t = trim(line);
    if (!header_done) {
      if (t[0] == '#' || t[0] == 0) continue;
      strcpy(hdr, t);
      ncols = split(hdr, cols);
      for (i = 0; i < r->ninputs; i++) {
        colof[i] = -1;
        for (j = 0; j < ncols; j++) if (strcmp(cols[j], r->inputs[i].name) == 0) colof[i] = j;
        if (colof[i] < 0 && !r->inputs[i].has_default) {
          fprintf(stderr, "areal-native: %s: missing column '%s'\n", path ? path : "stdin", r->inputs[i].name);
          exit(2);
        }
      }
      for (j = 0; j < ncols; j++) printf("%s,", cols[j]);
      for (i = 0; i < r->noutputs; i++) printf("%s,", r->outputs[i]);
      printf("status\n");
      header_done = 1;
      continue;
    }
    if (t[0] == '#' || t[0] == 0) continue;
    if (split(t, cells) != ncols) {
      fprintf(stderr, "areal-native: line %d: wrong number of cells\n", lineno);
      exit(2);
    }
    for (i = 0; i < r->ninputs; i++) {
      const areal_input_t *inp = &r->inputs[i];
      if (colof[i] < 0) { args[i] = inp->def; continue; }
      for (j = 0; j < inp->nchoices; j++) if (strcmp(inp->choices[j].word, cells[colof[i]]) == 0) break;
      if (inp->nchoices > 0 && j < inp->nchoices) { args[i] = inp->choices[j].value; continue; }
      if (!parse_cell(cells[colof[i]], &args[i])) {
        fprintf(stderr, "areal-native: line %d: column '%s' holds '%s', which is not a number\n", lineno, inp->name, cells[colof[i]]);
        exit(2);
      }
    }
    {
      int32_t st = AREAL_EXPORTS[ex].call(&instance, args);
      for (j = 0; j < ncols; j++) printf("%s,", cells[j]);
      for (i = 0; i < r->noutputs; i++) {
        js_number(st >= 0 && st < AREAL_FIRST_ERROR ? slot(i) : NAN, num);
        printf("%s,", num);
      }
      printf("%s\n", status_word(st, sw));
    }
  }
  if (!header_done) fail("empty input (no header line)", NULL);
  return 0;
}

int main(int argc, char **argv) {
  int rc;
  if (argc < 2) {
    fprintf(stderr, "usage: areal-native list | eval ROUTINE [FILE] | serve [IN OUT]\n");
    return 2;
  }
  wasm_rt_init();
  Z_areal_init_module();
  Z_areal_instantiate(&instance);
  if (strcmp(argv[1], "list") == 0) rc = cmd_list();
  else if (strcmp(argv[1], "eval") == 0 && argc >= 3) rc = cmd_eval(argv[2], argc >= 4 ? argv[3] : NULL);
  else if (strcmp(argv[1], "serve") == 0) rc = cmd_serve(argc >= 4 ? argv[2] : NULL, argc >= 4 ? argv[3] : NULL);
  else {
    fprintf(stderr, "areal-native: unknown command '%s' (list, eval, serve)\n", argv[1]);
    rc = 2;
  }
  Z_areal_free(&instance);
  wasm_rt_free();
  return rc;
}
