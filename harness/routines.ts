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
  {
    name: "propagate",
    exportName: "propagate",
    summary: "two-body propagation by universal variables, any conic, dt of either sign",
    inputs: [r("mu"), r("r0x"), r("r0y"), r("r0z"), r("v0x"), r("v0y"), r("v0z"), r("dt")],
    outputs: ["rx", "ry", "rz", "vx", "vy", "vz", "iterations"],
  },
  {
    name: "transition",
    exportName: "transition",
    summary: "propagation with the 6x6 state transition matrix d(r, v) / d(r0, v0), any conic, dt of either sign",
    inputs: [r("mu"), r("r0x"), r("r0y"), r("r0z"), r("v0x"), r("v0y"), r("v0z"), r("dt")],
    outputs: ["rx", "ry", "rz", "vx", "vy", "vz", ...Array.from({ length: 36 }, (_, k) => `phi_${Math.floor(k / 6) + 1}${(k % 6) + 1}`), "iterations"],
  },
  {
    name: "lambert",
    exportName: "lambert",
    summary: "Lambert's problem (Izzo 2015): v1, v2 from r1, r2, time of flight, complete revolutions, direction, branch",
    inputs: [
      r("mu"), r("r1x"), r("r1y"), r("r1z"), r("r2x"), r("r2y"), r("r2z"), r("tof"),
      { name: "revs", default: 0, integer: true },
      { name: "retrograde", default: 0, integer: true }, // 0: prograde (h_z > 0), 1: retrograde
      // revs >= 1: the solution with the smaller (short-period) or larger (long-period) semi-major axis.
      { name: "branch", default: 0, integer: true, choices: { "short-period": 0, "long-period": 1 } },
    ],
    outputs: ["v1x", "v1y", "v1z", "v2x", "v2y", "v2z", "iterations"],
  },
  {
    name: "elements",
    exportName: "elements",
    summary: "state -> classical elements a, e, i, RAAN, argp, nu (radians) and p; a = 0 marks a parabola",
    inputs: [r("mu"), r("rx"), r("ry"), r("rz"), r("vx"), r("vy"), r("vz")],
    outputs: ["a", "e", "i", "raan", "argp", "nu", "p"],
  },
  {
    name: "state",
    exportName: "state",
    summary: "classical elements (a, or p in place of a for any conic) -> state",
    inputs: [r("mu"), r("a"), r("e"), r("i"), r("raan"), r("argp"), r("nu")],
    outputs: ["rx", "ry", "rz", "vx", "vy", "vz"],
    alternatives: [{ exportName: "state_p", inputs: [r("mu"), r("p"), r("e"), r("i"), r("raan"), r("argp"), r("nu")] }],
  },
  {
    name: "equinoctial",
    exportName: "equinoctial",
    summary: "state -> modified equinoctial elements p, f, g, h, k, L",
    inputs: [r("mu"), r("rx"), r("ry"), r("rz"), r("vx"), r("vy"), r("vz")],
    outputs: ["p", "f", "g", "h", "k", "L"],
  },
  {
    name: "from-equinoctial",
    exportName: "from_equinoctial",
    summary: "modified equinoctial elements -> state",
    inputs: [r("mu"), r("p"), r("f"), r("g"), r("h"), r("k"), r("L")],
    outputs: ["rx", "ry", "rz", "vx", "vy", "vz"],
  },
  {
    name: "invariants",
    exportName: "invariants",
    summary: "energy, angular momentum, eccentricity vector, areal velocity h/2, flight-path angle of a state",
    inputs: [r("mu"), r("rx"), r("ry"), r("rz"), r("vx"), r("vy"), r("vz")],
    outputs: ["energy", "hx", "hy", "hz", "h", "ex", "ey", "ez", "e", "areal_velocity", "fpa"],
  },
  {
    name: "gravity-zonal",
    exportName: "gravity_zonal",
    summary: "acceleration and potential energy of a point mass plus zonal J2, J3 (z along the symmetry axis)",
    inputs: [r("mu"), { name: "j2", default: 0 }, { name: "j3", default: 0 }, { name: "radius", default: 1 }, r("x"), r("y"), r("z")],
    outputs: ["ax", "ay", "az", "potential"],
  },
  {
    name: "integrate",
    exportName: "integrate",
    summary: "fixed-step propagation (rk4, verlet, yoshida4, butcher6) with the invariants monitored on every step",
    inputs: [
      r("mu"), r("r0x"), r("r0y"), r("r0z"), r("v0x"), r("v0y"), r("v0z"), r("step"),
      { name: "steps", integer: true },
      { name: "method", choices: { rk4: 0, verlet: 1, yoshida4: 2, butcher6: 3 } },
      { name: "j2", default: 0 }, { name: "j3", default: 0 }, { name: "radius", default: 1 },
      { name: "energy_budget", default: 0 }, { name: "h_budget", default: 0 },
      { name: "ecc_budget", default: 0 }, { name: "areal_budget", default: 0 },
    ],
    outputs: ["rx", "ry", "rz", "vx", "vy", "vz", "energy_dev", "h_dev", "ecc_dev", "areal_dev",
      "energy_step", "h_step", "ecc_step", "areal_step"],
  },
];

/** The routine with the given CLI name, or undefined. */
export function findRoutine(name: string): Routine | undefined {
  return ROUTINES.find((x) => x.name === name);
}
