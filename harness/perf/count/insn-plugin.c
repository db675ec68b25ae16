/*
 * areal's instruction-count plugin for QEMU 7.2 (user mode and system mode): counts every guest instruction
 * retired, one inline counter per instruction, and prints "areal-insns N" on stderr when the guest exits, then
 * one line "areal-class NAME N" per instruction class (classify() below: by the mnemonic QEMU's disassembler
 * gives, the same words on every instruction set this project counts).
 *
 * Debian ships no qemu-plugin.h, so this file declares the few parts of QEMU's plugin API it uses (the API is
 * plain C; QEMU_PLUGIN_VERSION 1 is the version of QEMU 7.2). It is built at count time into build/count/
 * (harness/perf/toolchain.ts): gcc -O2 -shared -fPIC.
 *
 * Counting per instruction, not per block: a block's count added once per block execution counted an
 * instruction that crosses a page boundary twice (QEMU 7.2 ends the block before such an instruction and
 * translates it again at the start of the next one, while the first block's length still included it): 288
 * instructions a call against callgrind's 287 on a kepler_elliptic build whose addsd straddled a page
 * (tests/count.test.ts). An inline counter on each instruction runs only where the instruction's code runs. The
 * per-call count is a difference of two runs (harness/perf/count.ts), so start-up and exit cancel.
 */
#include <stdint.h>
#include <stdio.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>
#include <ctype.h>

#define QEMU_PLUGIN_VERSION 1
#define EXPORT __attribute__((visibility("default")))

typedef uint64_t qemu_plugin_id_t;
typedef struct qemu_info_t qemu_info_t; /* only passed through */
struct qemu_plugin_tb;
struct qemu_plugin_insn;
enum qemu_plugin_op { QEMU_PLUGIN_INLINE_ADD_U64 = 0 };
typedef void (*qemu_plugin_vcpu_tb_trans_cb_t)(qemu_plugin_id_t id, struct qemu_plugin_tb *tb);
typedef void (*qemu_plugin_udata_cb_t)(qemu_plugin_id_t id, void *userdata);

extern void qemu_plugin_register_vcpu_tb_trans_cb(qemu_plugin_id_t id, qemu_plugin_vcpu_tb_trans_cb_t cb);
extern size_t qemu_plugin_tb_n_insns(const struct qemu_plugin_tb *tb);
extern void qemu_plugin_register_vcpu_insn_exec_inline(struct qemu_plugin_insn *insn, enum qemu_plugin_op op, void *ptr, uint64_t imm);
extern void qemu_plugin_register_atexit_cb(qemu_plugin_id_t id, qemu_plugin_udata_cb_t cb, void *userdata);
extern struct qemu_plugin_insn *qemu_plugin_tb_get_insn(const struct qemu_plugin_tb *tb, size_t idx);
extern char *qemu_plugin_insn_disas(const struct qemu_plugin_insn *insn);

EXPORT int qemu_plugin_version = QEMU_PLUGIN_VERSION;

static uint64_t insns;

/* Instruction classes: floating-point division and square root, other floating point, loads and stores, control
 * transfers, and the rest (integer arithmetic, moves between registers, compares). */
enum { C_FDIV, C_FP, C_MEM, C_BRANCH, C_INT, N_CLASSES };
static const char *const CLASS_NAMES[N_CLASSES] = { "fdiv", "fp", "mem", "branch", "int" };
static uint64_t classes[N_CLASSES];

static int starts(const char *s, const char *p) { return strncmp(s, p, strlen(p)) == 0; }
static int ends(const char *s, size_t n, const char *p) { size_t k = strlen(p); return n >= k && strncmp(s + n - k, p, k) == 0; }

/* The class of one instruction from its mnemonic (the first word of the disassembly, lower case, without an ARM
 * condition or width suffix after a dot). Arm and Thumb (VFP), RISC-V (F, D, C) and x86-64 (SSE) mnemonics. */
static int classify(const char *text) {
  char m[32];
  size_t n = 0;
  while (*text == ' ' || *text == '\t') text++;
  /* RISC-V's disassembly starts with the encoding (4 or 8 hex digits): skip it. */
  size_t h = strspn(text, "0123456789abcdef");
  if ((h == 4 || h == 8) && (text[h] == ' ' || text[h] == '\t')) {
    text += h;
    while (*text == ' ' || *text == '\t') text++;
  }
  while (text[n] && text[n] != ' ' && text[n] != '\t' && n < sizeof m - 1) { m[n] = (char)tolower((unsigned char)text[n]); n++; }
  m[n] = 0;
  const char *op = starts(m, "c.") ? m + 2 : m; /* RISC-V compressed forms */
  size_t k = strlen(op);
  if (starts(op, "vdiv") || starts(op, "vsqrt") || starts(op, "fdiv") || starts(op, "fsqrt") || starts(op, "divs") || starts(op, "sqrts") || starts(op, "divp") || starts(op, "sqrtp")) return C_FDIV;
  if (starts(op, "ldr") || starts(op, "str") || starts(op, "ldm") || starts(op, "stm") || starts(op, "push") || starts(op, "pop") || starts(op, "vldr") || starts(op, "vstr") || starts(op, "vpush") || starts(op, "vpop") || starts(op, "vldm") || starts(op, "vstm")) return C_MEM;
  if (!strcmp(op, "lb") || !strcmp(op, "lh") || !strcmp(op, "lw") || !strcmp(op, "ld") || !strcmp(op, "lbu") || !strcmp(op, "lhu") || !strcmp(op, "lwu") || !strcmp(op, "sb") || !strcmp(op, "sh") || !strcmp(op, "sw") || !strcmp(op, "sd") || !strcmp(op, "fld") || !strcmp(op, "fsd") || !strcmp(op, "flw") || !strcmp(op, "fsw") || starts(op, "ldsp") || starts(op, "sdsp") || starts(op, "lwsp") || starts(op, "swsp") || starts(op, "fldsp") || starts(op, "fsdsp")) return C_MEM;
  if (starts(op, "mov") && (strchr(text, '(') || strchr(text, '['))) return C_MEM; /* x86-64 loads and stores */
  if (op[0] == 'v' && strchr(op, '.') && strstr(op, ".f")) return C_FP; /* VFP: vadd.f64, vmul.f32, vcvt.f64.f32 */
  if (op[0] == 'f' && strchr(op, '.')) return C_FP; /* RISC-V F and D: fadd.d, fmadd.d, fcvt.d.w */
  if (!starts(op, "mov") && (ends(op, k, "sd") || ends(op, k, "ss") || ends(op, k, "pd") || ends(op, k, "ps"))) return C_FP; /* SSE */
  if (op[0] == 'j' || starts(op, "call") || starts(op, "ret") || starts(op, "cbz") || starts(op, "cbnz") || starts(op, "bl") || starts(op, "bx") || starts(op, "beq") || starts(op, "bne") || starts(op, "blt") || starts(op, "bge") || starts(op, "bgt") || starts(op, "ble") || starts(op, "bhi") || starts(op, "bls") || starts(op, "bcs") || starts(op, "bcc") || starts(op, "bhs") || starts(op, "blo") || starts(op, "bmi") || starts(op, "bpl") || starts(op, "bvs") || starts(op, "bvc") || !strcmp(op, "b") || starts(op, "b.") || starts(op, "tbb") || starts(op, "tbh")) return C_BRANCH;
  return C_INT;
}

static void on_translate(qemu_plugin_id_t id, struct qemu_plugin_tb *tb) {
  (void)id;
  size_t n = qemu_plugin_tb_n_insns(tb);
  for (size_t i = 0; i < n; i++) {
    struct qemu_plugin_insn *insn = qemu_plugin_tb_get_insn(tb, i);
    char *text = qemu_plugin_insn_disas(insn);
    int c = text ? classify(text) : C_INT;
    free(text);
    qemu_plugin_register_vcpu_insn_exec_inline(insn, QEMU_PLUGIN_INLINE_ADD_U64, &insns, 1);
    qemu_plugin_register_vcpu_insn_exec_inline(insn, QEMU_PLUGIN_INLINE_ADD_U64, &classes[c], 1);
  }
}

static void at_guest_exit(qemu_plugin_id_t id, void *userdata) {
  (void)id;
  (void)userdata;
  fprintf(stderr, "areal-insns %llu\n", (unsigned long long)insns);
  for (int c = 0; c < N_CLASSES; c++) fprintf(stderr, "areal-class %s %llu\n", CLASS_NAMES[c], (unsigned long long)classes[c]);
  fflush(stderr);
}

EXPORT int qemu_plugin_install(qemu_plugin_id_t id, const qemu_info_t *info, int argc, char **argv) {
  (void)info;
  (void)argc;
  (void)argv;
  qemu_plugin_register_vcpu_tb_trans_cb(id, on_translate);
  qemu_plugin_register_atexit_cb(id, at_guest_exit, NULL);
  return 0;
}
