// The long run of tests/codec.test.ts: the codec's format against String() and parse against Number() on many
// more doubles and decimals of every kind (harness/verify/codec-cases.ts), from a seed of its own.
//
//   npm run test:codec-long -- [--n 2000000] [--seed 1]
//
// n is the generator's count: about 7.5 n doubles and 10 n decimals. Prints the counts, the parse answers left
// to Number() (by digits: up to 19 must be none), the first mismatches; exits 1 on any mismatch.
import { parseArgs } from "node:util";

const dist = (p) => new URL(`../dist/harness/${p}`, import.meta.url).href;
const { codec, PARSE_OK, PARSE_NOT_DECIMAL } = await import(dist("core/codec.js"));
const { shortest } = await import(dist("core/float.js"));
const { Rng } = await import(dist("core/rng.js"));
const { doublesOfEveryKind, decimalsOfEveryKind, significantDigits } = await import(dist("verify/codec-cases.js"));

const { values } = parseArgs({ options: { n: { type: "string", default: "2000000" }, seed: { type: "string", default: "1" } } });
const n = Number(values.n);
const seed = Number(values.seed);
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const cd = codec();
const bad = [];
let doubles = 0;
for (const x of doublesOfEveryKind(new Rng(seed), n)) {
  doubles++;
  const got = cd.formatOne(x);
  if (got !== shortest(x)) bad.push(`format ${shortest(x)}: ${got}`);
}
let decimals = 0;
let unsureShort = 0;
let unsureLong = 0;
for (const s of decimalsOfEveryKind(new Rng(seed + 1), n)) {
  decimals++;
  const [code, v] = cd.parseText(s);
  const x = Number(s);
  if (code === PARSE_OK) {
    if (!Object.is(v, x)) bad.push(`parse ${s}: ${v}, Number() ${x}`);
  } else if (code === PARSE_NOT_DECIMAL) {
    if (DECIMAL.test(s)) bad.push(`parse ${s}: said not a decimal`);
  } else if (x !== 0 && Number.isFinite(x)) {
    if (significantDigits(s) <= 19) unsureShort++;
    else unsureLong++;
  }
}
if (unsureShort > 0) bad.push(`${unsureShort} decimals of up to 19 digits left to Number()`);
process.stdout.write(`format: ${doubles} doubles; parse: ${decimals} decimals, left to Number(): ${unsureShort} of up to 19 digits, ${unsureLong} longer\n`);
for (const b of bad.slice(0, 20)) process.stdout.write(`MISMATCH ${b}\n`);
process.stdout.write(bad.length === 0 ? "all equal to String() and Number()\n" : `${bad.length} mismatches\n`);
process.exitCode = bad.length === 0 ? 0 : 1;
