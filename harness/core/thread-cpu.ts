/**
 * The CPU time of one thread of this process, where the system reports it: on Linux, /proc/thread-self names a
 * thread's id and /proc/self/task/ID/stat holds its user and system times (fields 14 and 15, in clock ticks of
 * 1/100 s: USER_HZ, fixed at 100 in the Linux user ABI — common practice, see proc(5)). Elsewhere both functions
 * return undefined and callers fall back to wall time.
 */
import { readFileSync, readlinkSync } from "node:fs";

/** Clock ticks per second of the times in /proc/.../stat (USER_HZ). */
const TICKS_PER_SECOND = 100;

/** The calling thread's kernel id, or undefined where /proc/thread-self does not exist. */
export function ownThreadId(): number | undefined {
  try {
    const id = Number(readlinkSync("/proc/thread-self").split("/").pop());
    return Number.isInteger(id) && id > 0 ? id : undefined;
  } catch {
    return undefined;
  }
}

/** User plus system CPU time of thread `tid` of this process (milliseconds), or undefined if not readable. */
export function threadCpuMs(tid: number): number | undefined {
  if (!(tid > 0)) return undefined;
  try {
    const stat = readFileSync(`/proc/self/task/${tid}/stat`, "latin1");
    // The command name (field 2) is in parentheses and may hold spaces: count fields after its closing one.
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    const ticks = Number(f[11]) + Number(f[12]);
    return Number.isFinite(ticks) ? (ticks * 1000) / TICKS_PER_SECOND : undefined;
  } catch {
    return undefined;
  }
}
