/*
 * areal's instruction-count plugin for QEMU 7.2 (user mode and system mode): counts every guest instruction
 * retired, whole translation blocks at a time, and prints "areal-insns N" on stderr when the guest exits.
 *
 * Debian ships no qemu-plugin.h, so this file declares the few parts of QEMU's plugin API it uses (the API is
 * plain C; QEMU_PLUGIN_VERSION 1 is the version of QEMU 7.2). It is built at count time into build/count/
 * (harness/perf/toolchain.ts): gcc -O2 -shared -fPIC.
 *
 * Counting whole blocks: a translation block ends at every branch, so a block that starts runs to its end unless
 * the guest faults inside it; the counted driver never faults, and the per-call count is a difference of two runs
 * (harness/perf/count.ts), so start-up and exit cancel.
 */
#include <stdint.h>
#include <stdio.h>
#include <stddef.h>

#define QEMU_PLUGIN_VERSION 1
#define EXPORT __attribute__((visibility("default")))

typedef uint64_t qemu_plugin_id_t;
typedef struct qemu_info_t qemu_info_t; /* only passed through */
struct qemu_plugin_tb;
enum qemu_plugin_op { QEMU_PLUGIN_INLINE_ADD_U64 = 0 };
typedef void (*qemu_plugin_vcpu_tb_trans_cb_t)(qemu_plugin_id_t id, struct qemu_plugin_tb *tb);
typedef void (*qemu_plugin_udata_cb_t)(qemu_plugin_id_t id, void *userdata);

extern void qemu_plugin_register_vcpu_tb_trans_cb(qemu_plugin_id_t id, qemu_plugin_vcpu_tb_trans_cb_t cb);
extern size_t qemu_plugin_tb_n_insns(const struct qemu_plugin_tb *tb);
extern void qemu_plugin_register_vcpu_tb_exec_inline(struct qemu_plugin_tb *tb, enum qemu_plugin_op op, void *ptr, uint64_t imm);
extern void qemu_plugin_register_atexit_cb(qemu_plugin_id_t id, qemu_plugin_udata_cb_t cb, void *userdata);

EXPORT int qemu_plugin_version = QEMU_PLUGIN_VERSION;

static uint64_t insns;

static void on_translate(qemu_plugin_id_t id, struct qemu_plugin_tb *tb) {
  (void)id;
  qemu_plugin_register_vcpu_tb_exec_inline(tb, QEMU_PLUGIN_INLINE_ADD_U64, &insns, qemu_plugin_tb_n_insns(tb));
}

static void on_exit(qemu_plugin_id_t id, void *userdata) {
  (void)id;
  (void)userdata;
  fprintf(stderr, "areal-insns %llu\n", (unsigned long long)insns);
  fflush(stderr);
}

EXPORT int qemu_plugin_install(qemu_plugin_id_t id, const qemu_info_t *info, int argc, char **argv) {
  (void)info;
  (void)argc;
  (void)argv;
  qemu_plugin_register_vcpu_tb_trans_cb(id, on_translate);
  qemu_plugin_register_atexit_cb(id, on_exit, NULL);
  return 0;
}
