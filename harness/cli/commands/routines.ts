/** `areal routines`: the routine table, from the ABI table. */
import { ROUTINES } from "../../module/routines.js";
import { wrap, type Command } from "../options.js";

export const routinesCommand: Command = {
  summary: "list the routines with their input and output columns ([x]: optional, with a default)",
  options: [],
  run() {
    for (const r of ROUTINES) {
      const ins = r.inputs.map((i) => (i.default !== undefined ? `[${i.name}]` : i.name)).join(",");
      const lines = [`${r.name}: ${r.summary}`, `  inputs: ${ins}`, `  outputs: ${[...r.outputs, "status"].join(",")}`];
      process.stdout.write(lines.flatMap((l) => wrap(l, 100, "    ")).join("\n") + "\n");
    }
    return 0;
  },
};
