/**
 * parseJsonText (harness/core/json.ts), the one reader of JSON files given by the user (plans, grids, limits,
 * measured bench and count files): a place as file:line:column where V8 gives one, and a message of one line
 * either way (V8's excerpt of the text, which may hold line ends, is dropped). The expected texts are written by
 * hand from the inputs.
 */
import { describe, it, expect } from "vitest";
import { parseJsonText } from "../harness/core/json.js";

const err = (text: string): string => {
  try {
    parseJsonText(text, "f.json", (m) => new Error(m));
  } catch (e) {
    return (e as Error).message;
  }
  return "parsed";
};

describe("JSON errors", () => {
  it("a place where V8 gives an offset: line and column", () => {
    expect(err('{\n  "a": 1,\n  b: 2\n}')).toMatch(/^f\.json:3:3: not valid JSON \(/);
  });
  it("no offset (a text that is not JSON at all, here a Markdown file): one line, the token named, no excerpt", () => {
    const m = err("# areal\n\nabc");
    expect(m).toBe("f.json: not valid JSON (Unexpected token '#')");
  });
  it("valid JSON parses", () => {
    expect(parseJsonText('{"a": [1, 2]}', "f.json", (m) => new Error(m))).toEqual({ a: [1, 2] });
  });
});
