// The text rewrite of the counting module (used by build-bench.mjs; tests/bench-plumbing.test.ts checks it on a
// hand-written module). Input: the stack-form text asc writes (one instruction per line). Every f64.div, f64.mul,
// f64.add, f64.sub and f64.sqrt instruction becomes a call of a helper that counts it while no library math call
// runs (the depth kept by assembly/counting_math.ts) and performs the same instruction. An add or sub right after
// a mul, or after a mul and one operand push, also counts as a fusable multiply-add pair.

export const DEPTH = "$assembly/counting_math/mathDepth";
export const ARITH = ["div", "mul", "add", "fma", "sqrt"];

/** The counting text: instructions replaced by counting calls, helpers and exports appended. */
export function instrument(wat, depthGlobal = DEPTH) {
  const lines = wat.split("\n");
  const ins = (l) => l.trim();
  const isOperand = (s) => /^(local\.get|global\.get|f64\.const) /.test(s);
  for (let i = 0; i < lines.length; i++) {
    const t = ins(lines[i]);
    const pad = lines[i].slice(0, lines[i].length - lines[i].trimStart().length);
    if (t === "f64.div") lines[i] = `${pad}call $__count_div`;
    else if (t === "f64.mul") lines[i] = `${pad}call $__count_mul`;
    else if (t === "f64.sqrt") lines[i] = `${pad}call $__count_sqrt`;
    else if (t === "f64.add" || t === "f64.sub") {
      const p1 = i > 0 ? ins(lines[i - 1]) : "";
      const p2 = i > 1 ? ins(lines[i - 2]) : "";
      const fused = p1 === "call $__count_mul" || (isOperand(p1) && p2 === "call $__count_mul");
      lines[i] = `${pad}call $__count_${t.slice(4)}${fused ? "_fma" : ""}`;
    }
  }
  if (!lines.some((l) => l.trim() === "call $__count_mul")) throw new Error("no f64.mul instruction found: the module text is not in the expected one-instruction-per-line form");
  const end = lines.lastIndexOf(")");
  if (end < 0) throw new Error("unexpected module text: no closing parenthesis");
  const counted = (name) => [`  global.get ${depthGlobal}`, "  i32.eqz", "  if", `   global.get $__n_${name}`, "   i64.const 1", "   i64.add", `   global.set $__n_${name}`, "  end"];
  const helper = (name, op, arity, counters) => [
    ` (func $__count_${name} (param $0 f64)${arity === 2 ? " (param $1 f64)" : ""} (result f64)`,
    ...counters.flatMap(counted),
    "  local.get $0", ...(arity === 2 ? ["  local.get $1"] : []), `  ${op}`, " )"];
  const extra = [
    ...ARITH.map((n) => ` (global $__n_${n} (mut i64) (i64.const 0))`),
    ...helper("div", "f64.div", 2, ["div"]),
    ...helper("mul", "f64.mul", 2, ["mul"]),
    ...helper("sqrt", "f64.sqrt", 1, ["sqrt"]),
    ...helper("add", "f64.add", 2, ["add"]),
    ...helper("sub", "f64.sub", 2, ["add"]),
    ...helper("add_fma", "f64.add", 2, ["add", "fma"]),
    ...helper("sub_fma", "f64.sub", 2, ["add", "fma"]),
    " (func $__count_arith (param $0 i32) (result f64)",
    ...ARITH.flatMap((n, i) => [`  local.get $0`, `  i32.const ${i}`, "  i32.eq", "  if", `   global.get $__n_${n}`, "   f64.convert_i64_u", "   return", "  end"]),
    "  f64.const -1",
    " )",
    " (func $__count_arith_reset",
    ...ARITH.flatMap((n) => ["  i64.const 0", `  global.set $__n_${n}`]),
    " )",
    ' (export "count_arith" (func $__count_arith))',
    ' (export "count_arith_reset" (func $__count_arith_reset))',
  ];
  lines.splice(end, 0, ...extra);
  return lines.join("\n");
}

