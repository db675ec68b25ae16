/**
 * What a reviewer needs to trace a report to what produced it: the module's SHA-256 (the same in the JSON), the
 * commit when run in a git checkout, areal's version, Node and V8 versions, host and date.
 */
import { createHash } from "node:crypto";
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import { arch, hostname, platform, release } from "node:os";
import { isAbsolute, join, relative } from "node:path";
import { BUILD_FILES, ROOT } from "../core/paths.js";

export interface Provenance {
  readonly module: string;
  readonly module_file: string | null;
  readonly module_sha256: string | null;
  readonly commit: string | null;
  /** True when the checkout had uncommitted changes at the time. */
  readonly commit_dirty: boolean | null;
  readonly areal_version: string;
  readonly node: string;
  readonly v8: string;
  readonly host: string;
  readonly generated: string;
}

/** The file a build label or module path stands for, when there is one. */
function moduleFile(label: string): string | null {
  const built = (BUILD_FILES as Record<string, string>)[label];
  if (built !== undefined) return existsSync(built) ? built : null;
  return existsSync(label) ? label : null;
}

/** A path inside the project as a project-relative path (a report names no folder of the machine it ran on). */
function shown(path: string): string {
  const r = relative(ROOT, path);
  return r.startsWith("..") || isAbsolute(r) ? path : r;
}

function git(args: string[]): string | null {
  try {
    return execFileSync("git", args, { cwd: ROOT, encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] }).trim();
  } catch {
    return null; // not a git checkout, or no git: the report says "not in a git checkout"
  }
}

/** The provenance of a report on the module `label` (a build name or a module path). */
export function provenanceOf(label: string, generated = new Date().toISOString()): Provenance {
  const file = moduleFile(label);
  const commit = git(["rev-parse", "HEAD"]);
  const status = commit === null ? null : git(["status", "--porcelain", "--untracked-files=no"]);
  const pkg = JSON.parse(readFileSync(join(ROOT, "package.json"), "utf8")) as { version: string };
  return {
    module: label,
    module_file: file === null ? null : shown(file),
    module_sha256: file === null ? null : createHash("sha256").update(readFileSync(file)).digest("hex"),
    commit,
    commit_dirty: status === null ? null : status !== "",
    areal_version: pkg.version,
    node: process.version,
    v8: process.versions.v8,
    host: `${hostname()} (${platform()} ${release()}, ${arch()})`,
    generated,
  };
}
