/**
 * Temporary files and folders removed when the process is interrupted. SIGINT and SIGTERM would otherwise end
 * the process at once, leaving a half-written `.out.csv.<pid>.tmp` beside the target or an `areal-eval-*`
 * folder in the temporary folder. The first registration installs handlers that remove every registered path
 * and exit with the conventional code (128 + signal number: 130 for SIGINT, 143 for SIGTERM). Targets are only
 * ever replaced by a rename, so an interrupt leaves each one as it was or whole.
 */
import { rmSync } from "node:fs";

const paths = new Set<string>();
let installed = false;

/** Exit codes by signal. */
export const SIGNAL_EXIT: Readonly<Record<"SIGINT" | "SIGTERM", number>> = { SIGINT: 130, SIGTERM: 143 };

/** Remove every registered path now (errors ignored: the path may not exist yet or any more). */
export function removeRegistered(): void {
  for (const p of paths) {
    try {
      rmSync(p, { recursive: true, force: true });
    } catch {
      // nothing more can be done while exiting
    }
  }
  paths.clear();
}

/**
 * Install the signal handlers now (removeOnSignal does it too). Call it before creating a temporary path whose
 * name is known only once created (mkdtemp): a signal between the creation and the registration would otherwise
 * meet no handler and end the process with the path left behind.
 */
export function armSignalCleanup(): void {
  install();
}

function install(): void {
  if (installed) return;
  installed = true;
  for (const sig of ["SIGINT", "SIGTERM"] as const) {
    process.on(sig, () => {
      removeRegistered();
      process.stderr.write(`areal: interrupted (${sig}); temporary files removed, no output written\n`);
      process.exit(SIGNAL_EXIT[sig]);
    });
  }
}

/** Remove `path` (file or folder) if the process is interrupted; the returned function forgets it again. */
export function removeOnSignal(path: string): () => void {
  install();
  paths.add(path);
  return () => {
    paths.delete(path);
  };
}
