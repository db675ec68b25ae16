// The module's exports: the ABI documented in docs/abi.md. This file only re-exports.
export { areal_out, areal_real_bytes, areal_abi_version } from "./io";
export { kepler_elliptic } from "./kepler_elliptic";
export { kepler_hyperbolic } from "./kepler_hyperbolic";
export { kepler_parabolic } from "./kepler_parabolic";
export { true_to_anomaly, anomaly_to_true, true_to_mean, mean_to_true, time_of_flight } from "./anomaly";
export { propagate } from "./universal";
export { transition } from "./transition";
export { lambert } from "./lambert";
export { lambert_partials } from "./lambert_partials";
export { elements, state, state_p } from "./elements";
export { equinoctial, from_equinoctial } from "./equinoctial";
export { invariants } from "./invariants";
export { gravity_zonal } from "./gravity";
export { integrate, integrate_begin, integrate_step, integrate_transition, integrate_transition_begin, integrate_phi } from "./integrators";
export { to_relative, from_relative, relative_motion } from "./relative";
export { rendezvous_linear } from "./rendezvous";
