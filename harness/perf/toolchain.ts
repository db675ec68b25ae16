/**
 * The tools `areal count` uses, per target, found on this system (never downloaded): wasm2c and its runtime
 * (wabt), a C compiler and C library for the target, and QEMU with areal's own instruction-count plugin
 * (count/insn-plugin.c, built here into build/count/ with the host C compiler). When a tool is missing, the
 * target is skipped with one line naming the Debian package that provides it.
 *
 * Targets (names as in the JSON):
 *   x86-64      host gcc, glibc, static;               qemu-x86_64 (qemu-user), default CPU model (qemu64)
 *   armhf       arm-linux-gnueabihf-gcc, glibc, static; qemu-arm (qemu-user), ARMv7-A + VFPv3-D16, Thumb-2
 *   riscv64     riscv64-linux-gnu-gcc, glibc, static;   qemu-riscv64 (qemu-user), RV64GC
 *   cortex-m4f  arm-none-eabi-gcc, picolibc, semihosting; qemu-system-arm -M mps2-an386 (qemu-system-arm),
 *               FPv4-SP-D16: single-precision FPU, f64 arithmetic in software (libgcc)
 */
import { execFileSync } from "node:child_process";
import { existsSync, statSync } from "node:fs";
import { delimiter, join } from "node:path";

export const TARGETS = ["x86-64", "armhf", "riscv64", "cortex-m4f"] as const;
export type TargetName = (typeof TARGETS)[number];

/** The wasm2c runtime (three files) as Debian's wabt installs it. */
export const WASM2C_RUNTIME = "/usr/src/wasm2c";

/** Flags of every compile: -ffp-contract=off keeps a * b + c two roundings (WebAssembly never fuses). */
export const COMMON_CFLAGS = ["-O2", "-std=gnu99", "-ffp-contract=off", "-ffunction-sections", "-fdata-sections"];

export interface TargetSpec {
  readonly name: TargetName;
  readonly cc: string;
  readonly cflags: readonly string[];
  readonly ldflags: readonly string[];
  /** The runtime's source needs the bare-metal patches (short enums, no mmap). */
  readonly bareMetal: boolean;
  /** Other files that must exist (a C library), with their package. */
  readonly files: readonly { path: string; pkg: string }[];
  readonly emulator: string;
  readonly packages: Readonly<Record<string, string>>;
  /** The emulator's command line that runs `image` with the two driver arguments, counting with `plugin`. */
  command(image: string, args: readonly string[], plugin: string): string[];
}

const userMode = (emulator: string) => (image: string, args: readonly string[], plugin: string) => [emulator, "-plugin", plugin, image, ...args];

export const TARGET_SPECS: Readonly<Record<TargetName, TargetSpec>> = {
  "x86-64": {
    name: "x86-64", cc: "gcc", cflags: [], ldflags: ["-static", "-Wl,--gc-sections"], bareMetal: false,
    files: [{ path: "/usr/lib/x86_64-linux-gnu/libc.a", pkg: "libc6-dev" }],
    emulator: "qemu-x86_64", packages: { gcc: "gcc", "qemu-x86_64": "qemu-user" },
    command: userMode("qemu-x86_64"),
  },
  armhf: {
    name: "armhf", cc: "arm-linux-gnueabihf-gcc", cflags: [], ldflags: ["-static", "-Wl,--gc-sections"], bareMetal: false,
    files: [{ path: "/usr/arm-linux-gnueabihf/lib/libc.a", pkg: "libc6-dev-armhf-cross" }],
    emulator: "qemu-arm", packages: { "arm-linux-gnueabihf-gcc": "gcc-arm-linux-gnueabihf", "qemu-arm": "qemu-user" },
    command: userMode("qemu-arm"),
  },
  riscv64: {
    name: "riscv64", cc: "riscv64-linux-gnu-gcc", cflags: [], ldflags: ["-static", "-Wl,--gc-sections"], bareMetal: false,
    files: [{ path: "/usr/riscv64-linux-gnu/lib/libc.a", pkg: "libc6-dev-riscv64-cross" }],
    emulator: "qemu-riscv64", packages: { "riscv64-linux-gnu-gcc": "gcc-riscv64-linux-gnu", "qemu-riscv64": "qemu-user" },
    command: userMode("qemu-riscv64"),
  },
  "cortex-m4f": {
    name: "cortex-m4f", cc: "arm-none-eabi-gcc",
    cflags: ["-mcpu=cortex-m4", "-mthumb", "-mfpu=fpv4-sp-d16", "-mfloat-abi=hard", "--specs=picolibc.specs", "--oslib=semihost", "--crt0=semihost"],
    ldflags: ["-Wl,--gc-sections", "-Wl,--defsym=__flash=0,--defsym=__flash_size=0x400000,--defsym=__ram=0x20000000,--defsym=__ram_size=0x400000,--defsym=__stack_size=0x10000"],
    bareMetal: true,
    files: [{ path: "/usr/lib/picolibc/arm-none-eabi/picolibc.specs", pkg: "picolibc-arm-none-eabi" }],
    emulator: "qemu-system-arm", packages: { "arm-none-eabi-gcc": "gcc-arm-none-eabi", "qemu-system-arm": "qemu-system-arm" },
    command: (image, args, plugin) => ["qemu-system-arm", "-M", "mps2-an386", "-nographic", "-monitor", "none", "-serial", "none",
      "-semihosting-config", `enable=on,target=native,arg=driver,${args.map((a) => `arg=${a}`).join(",")}`, "-plugin", plugin, "-kernel", image],
  },
};

/** The tools every target needs: wasm2c, its runtime, the host compiler for the plugin. */
const SHARED: Readonly<Record<string, string>> = { wasm2c: "wabt", gcc: "gcc" };

/** The full path of an executable on PATH, or undefined. */
export function onPath(name: string): string | undefined {
  for (const dir of (process.env.PATH ?? "").split(delimiter)) {
    const p = join(dir, name);
    try {
      if (dir && statSync(p).isFile()) return p;
    } catch {
      // not in this folder
    }
  }
  return undefined;
}

/** The packages whose tools a target lacks here (empty: the target can be counted). */
export function missingPackages(t: TargetName): string[] {
  const spec = TARGET_SPECS[t];
  const miss = new Set<string>();
  for (const [tool, pkg] of Object.entries({ ...SHARED, ...spec.packages })) if (!onPath(tool)) miss.add(pkg);
  if (!existsSync(join(WASM2C_RUNTIME, "wasm-rt-impl.c"))) miss.add("wabt");
  for (const f of spec.files) if (!existsSync(f.path)) miss.add(f.pkg);
  return [...miss];
}

/** One line per target that cannot be counted here, naming the packages that provide what is missing. */
export function missingLines(targets: readonly TargetName[]): string[] {
  return targets.flatMap((t) => {
    const m = missingPackages(t);
    return m.length ? [`${t}: not counted, missing tools; on Debian: apt-get install ${m.join(" ")}`] : [];
  });
}

/** The first line of `tool --version` (what the counts depend on), or "unknown". */
export function versionOf(tool: string): string {
  try {
    return execFileSync(tool, ["--version"], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] }).split("\n")[0]!.trim();
  } catch {
    return "unknown";
  }
}
