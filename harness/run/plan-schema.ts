/**
 * The trajectory plan's JSON Schema (docs/trajectory-plan.schema.json, draft 2020-12), validated with Ajv
 * (the npm package ajv, pinned). Every error is one line naming the file, the JSON path of the value ($ for the
 * plan itself, $.elements.e, $.budgets.energy, ...) and what was expected there; all errors of a plan are given at
 * once. Checks the schema cannot say (a valid calendar date, a duration that is a whole
 * number of steps, finite numbers) stay in trajectory.ts.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { Ajv2020, type ErrorObject, type ValidateFunction } from "ajv/dist/2020.js";
import { ROOT } from "../core/paths.js";

/** Where the schema lives in the project. */
export const PLAN_SCHEMA_FILE = join(ROOT, "docs", "trajectory-plan.schema.json");

let compiled: { validate: ValidateFunction; schema: Record<string, unknown> } | undefined;

/** The schema as an object (parsed once). */
export function planSchema(): Record<string, unknown> {
  return compiledSchema().schema;
}

function compiledSchema(): { validate: ValidateFunction; schema: Record<string, unknown> } {
  if (!compiled) {
    const schema = JSON.parse(readFileSync(PLAN_SCHEMA_FILE, "utf8")) as Record<string, unknown>;
    const ajv = new Ajv2020({ allErrors: true, strict: true, strictRequired: false });
    compiled = { validate: ajv.compile(schema), schema };
  }
  return compiled;
}

/** A JSON pointer (/elements/e, /r/0) as a JSON path ($.elements.e, $.r[0]). */
function jsonPath(pointer: string): string {
  if (pointer === "") return "$";
  return "$" + pointer.split("/").slice(1).map((p) => p.replace(/~1/g, "/").replace(/~0/g, "~")).map((p) => (/^\d+$/.test(p) ? `[${p}]` : `.${p}`)).join("");
}

/**
 * The choices the schema makes with allOf if/then/else, by scope (the plan, or its elements object) and the
 * schema path of the rule (relative to the elements' definition inside it).
 */
const EXCLUSIVE: readonly [string, RegExp, string][] = [
  ["plan", /^#\/allOf\/0\//, "the initial state is 'r' and 'v' (a state vector) or 'elements' (orbital elements): one of the two"],
  ["plan", /^#\/allOf\/1\//, "the length of the run is 'steps' or 'duration': one of the two"],
  ["elements", /^#\/allOf\/0\//, "the elements take 'a_km' or 'p_km': one of the two"],
  ["elements", /^#\/allOf\/1\//, "the elements take 'true_anomaly_deg' or 'mean_anomaly_deg': one of the two"],
];

/** The rule an error of an if/then/else breaks, in words, or undefined. */
function choiceOf(e: ErrorObject): string | undefined {
  const scope = e.instancePath === "/elements" || e.instancePath.startsWith("/elements/") ? "elements" : "plan";
  return EXCLUSIVE.find(([sc, re]) => sc === scope && re.test(e.schemaPath))?.[2];
}

/** What was expected, in words, for one Ajv error. */
function expected(e: ErrorObject, known: (path: string) => string[]): string {
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case "required":
      return `missing field '${String(p.missingProperty)}'${choiceOf(e) ? ` (${choiceOf(e)})` : ""}`;
    case "additionalProperties": {
      const names = known(e.instancePath);
      return `unknown field '${String(p.additionalProperty)}'; expected one of ${names.join(", ")}`;
    }
    case "false schema":
      return `not allowed with the other: ${choiceOf(e) ?? "this field is excluded by another"}`;
    case "type":
      return `expected ${p.type === "integer" ? "a whole number" : p.type === "number" ? "a number" : p.type === "object" ? "an object" : p.type === "array" ? "an array" : `a ${String(p.type)}`}`;
    case "enum":
      return `expected one of ${(p.allowedValues as unknown[]).map(String).join(", ")}`;
    case "minimum":
    case "maximum":
    case "exclusiveMinimum":
    case "exclusiveMaximum":
      return `expected a value ${String(p.comparison)} ${String(p.limit)}`;
    case "minItems":
    case "maxItems":
      return "expected an array of three numbers";
    case "pattern":
      return e.instancePath === "/epoch" ? "expected YYYY-MM-DDThh:mm:ss[.fff] (no zone suffix)" : "expected one line of text, not blank";
    case "minLength":
      return "expected one line of text, not blank";
    case "not":
      return "expected a value other than 0";
    default:
      return e.message ?? e.keyword;
  }
}

/** The property names the schema allows at an instance path (for "unknown field" messages). */
function knownAt(schema: Record<string, unknown>, pointer: string): string[] {
  const defs = schema.$defs as Record<string, { properties?: Record<string, unknown> }>;
  const props = pointer === "" ? (schema.properties as Record<string, unknown>) : pointer === "/elements" ? defs.elements!.properties! : pointer === "/budgets" ? ((schema.properties as Record<string, { properties?: Record<string, unknown> }>).budgets!.properties!) : {};
  return Object.keys(props);
}

/**
 * Validate a parsed plan against the schema. Returns the error lines ("FILE: $.path: expected ..."), empty when
 * the plan is valid. Errors of an if/then/else are reported once, by the rule they break (the "if" wrapper
 * errors are dropped).
 */
export function schemaErrors(plan: unknown, source: string): string[] {
  const { validate, schema } = compiledSchema();
  if (validate(plan)) return [];
  const seen = new Set<string>();
  const lines: string[] = [];
  for (const e of validate.errors ?? []) {
    if (e.keyword === "if") continue;
    const path = e.keyword === "required" ? jsonPath(`${e.instancePath}/${String((e.params as { missingProperty: string }).missingProperty)}`) : e.keyword === "additionalProperties" ? jsonPath(`${e.instancePath}/${String((e.params as { additionalProperty: string }).additionalProperty)}`) : jsonPath(e.instancePath);
    const line = `${source}: ${path}: ${expected(e, (p) => knownAt(schema, p))}`;
    if (!seen.has(line)) {
      seen.add(line);
      lines.push(line);
    }
  }
  return lines;
}
