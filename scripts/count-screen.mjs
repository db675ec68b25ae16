// `npm run count:screen [EXPORT...]`: find each kernel's worst-case inputs for `areal count` by exact counts on
// x86-64 (harness/perf/count-screen.ts) and write them into vectors/count-inputs.json beside the argument.
import { screenAll } from "../dist/harness/perf/count-screen.js";

const names = process.argv.slice(2);
await screenAll(names.length ? names : undefined, (l) => process.stderr.write(`${l}\n`));
