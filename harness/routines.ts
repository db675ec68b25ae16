/**
 * The routine table: one entry per kernel the CLI and the checks can call. A routine names its CSV input
 * columns (in the order of the kernel's arguments), its output columns (output slot i -> outputs[i]) and
 * the module export behind it. Adding a kernel to the tools means adding an entry here (DEVELOPERS.md).
 */

/** One input column. `choices` maps words to the integer the kernel takes (for example method names). */
export interface InputSpec {
  readonly name: string;
  /** Used when the column is absent from the input CSV. No default means the column is required. */
  readonly default?: number;
  /** Allowed words for an enumerated argument, mapped to the integer passed to the kernel. */
  readonly choices?: Readonly<Record<string, number>>;
  /** An integer argument (i32 in the ABI). */
  readonly integer?: boolean;
}

export interface Routine {
  /** CLI name, for example `kepler-elliptic`. */
  readonly name: string;
  /** The module export called. */
  readonly exportName: string;
  /** One line for `areal eval --help` and the check table. */
  readonly summary: string;
  readonly inputs: readonly InputSpec[];
  /** Output slot i is written to column outputs[i]. The status column follows them. */
  readonly outputs: readonly string[];
  /**
   * Alternative input sets: when a row lacks a required column, the first alternative whose columns are
   * all present is used instead (for example `p` in place of `a`). It names the export to call.
   */
  readonly alternatives?: readonly { readonly exportName: string; readonly inputs: readonly InputSpec[] }[];
}

const r = (name: string): InputSpec => ({ name });

export const ROUTINES: readonly Routine[] = [
  {
    name: "kepler-elliptic",
    exportName: "kepler_elliptic",
    summary: "eccentric anomaly E from E - e sin E = M (0 <= e < 1)",
    inputs: [r("e"), r("M")],
    outputs: ["E", "iterations"],
  },
  {
    name: "kepler-hyperbolic",
    exportName: "kepler_hyperbolic",
    summary: "hyperbolic anomaly H from e sinh H - H = M (e > 1)",
    inputs: [r("e"), r("M")],
    outputs: ["H", "iterations"],
  },
  {
    name: "kepler-parabolic",
    exportName: "kepler_parabolic",
    summary: "Barker's equation: D = tan(nu/2) from D + D^3/3 = M, and nu",
    inputs: [r("M")],
    outputs: ["D", "iterations", "nu"],
  },
  {
    name: "true-to-anomaly",
    exportName: "true_to_anomaly",
    summary: "true anomaly -> eccentric (e<1), parabolic D (e=1) or hyperbolic (e>1) anomaly",
    inputs: [r("e"), r("nu")],
    outputs: ["anomaly"],
  },
  {
    name: "anomaly-to-true",
    exportName: "anomaly_to_true",
    summary: "eccentric, parabolic or hyperbolic anomaly -> true anomaly",
    inputs: [r("e"), r("anomaly")],
    outputs: ["nu"],
  },
  {
    name: "true-to-mean",
    exportName: "true_to_mean",
    summary: "true anomaly -> mean anomaly (M, Barker's M or M_h)",
    inputs: [r("e"), r("nu")],
    outputs: ["M"],
  },
  {
    name: "mean-to-true",
    exportName: "mean_to_true",
    summary: "mean anomaly -> true anomaly through the Kepler solvers",
    inputs: [r("e"), r("M")],
    outputs: ["nu", "iterations"],
  },
  {
    name: "time-of-flight",
    exportName: "time_of_flight",
    summary: "time from nu1 to nu2 on the conic (mu, p, e) from the areal velocity h/2",
    inputs: [r("mu"), r("p"), r("e"), r("nu1"), r("nu2")],
    outputs: ["tof", "area", "areal_velocity"],
  },
];

/** The routine with the given CLI name, or undefined. */
export function findRoutine(name: string): Routine | undefined {
  return ROUTINES.find((x) => x.name === name);
}
