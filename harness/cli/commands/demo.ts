/** `areal demo`: the kernels on the built-in demo data. */
import { demoLines } from "../../run/demo.js";
import type { Command } from "../options.js";
import { loadKernels } from "../shared.js";

export const demoCommand: Command = {
  summary: "show the kernels on the built-in demo (an invented mission)",
  options: ["build", "module"],
  run(_pos, values) {
    process.stdout.write(demoLines(loadKernels(values)).join("\n") + "\n");
    return 0;
  },
};
