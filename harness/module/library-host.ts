/**
 * The child-process side of loadLibrary (library.ts): loads a native library with openLibrary and answers calls
 * through two named pipes, so that a crash in the library ends this process and not the harness.
 *   node library-host.js LIBRARY REQ RESP LABEL
 *   first    u32 length, JSON {realBytes, exports: [[name, params], ...]} or {error}
 *   request  u32 export index (in the order sent), u32 argument count, that many f64 (little-endian);
 *            an index of 0xffffffff ends the session
 *   response i32 status, u32 0, AREAL_OUT_SLOTS f64 output slots
 *   batch    u32 0xfffffffe, u32 export index, u32 argument count, u32 rows, u32 outputs, rows x arguments f64;
 *            response: rows statuses as f64, then rows x outputs f64 (the first output slots of each call)
 */
import { closeSync, openSync, readSync, writeSync } from "node:fs";
import { openLibrary, LIBRARY_RESPONSE_BYTES, LIBRARY_BATCH } from "./library.js";
import { OUT_SLOTS } from "./signatures.js";
import { callRows } from "./load.js";

function readAll(fd: number, buf: Buffer, n: number): boolean {
  let got = 0;
  while (got < n) {
    const r = readSync(fd, buf, got, n - got, null);
    if (r === 0) return false;
    got += r;
  }
  return true;
}

/** A batch request after its first two words (the marker and the export index); false on a short read. */
function serveBatch(req: number, resp: number, k: ReturnType<typeof openLibrary>["kernels"], names: readonly string[], index: number): boolean {
  const more = Buffer.alloc(12);
  if (!readAll(req, more, 12)) return false;
  const na = more.readUInt32LE(0);
  const rows = more.readUInt32LE(4);
  const nOut = more.readUInt32LE(8);
  if (na > 64 || nOut > OUT_SLOTS || rows > 1 << 20) return false;
  const abuf = Buffer.alloc(8 * rows * na);
  if (!readAll(req, abuf, abuf.length)) return false;
  const a = new Float64Array(abuf.buffer, abuf.byteOffset, rows * na);
  const res = new Float64Array(rows * (1 + nOut));
  const status = new Int32Array(rows);
  // the library's own batch entry points when it has them (areal_rows_NAME), else one call per row
  callRows(k, names[index]!, a, na, rows, res.subarray(rows), nOut, status);
  for (let r = 0; r < rows; r++) res[r] = status[r]!;
  writeSync(resp, new Uint8Array(res.buffer));
  return true;
}

function main(): void {
  const [lib, reqPath, respPath, label] = process.argv.slice(2) as [string, string, string, string];
  const req = openSync(reqPath, "r"); // the harness opens req first, then resp: the same order here
  const resp = openSync(respPath, "w");
  const send = (o: unknown): void => {
    const body = Buffer.from(JSON.stringify(o), "utf8");
    const head = Buffer.alloc(4);
    head.writeUInt32LE(body.length, 0);
    writeSync(resp, Buffer.concat([head, body]));
  };
  let opened: ReturnType<typeof openLibrary>;
  try {
    opened = openLibrary(lib, label);
  } catch (err) {
    send({ error: (err as Error).message });
    return;
  }
  const { kernels: k, table } = opened;
  const names = [...table.keys()];
  send({ realBytes: k.realBytes, exports: [...table.entries()] });
  const head = Buffer.alloc(8);
  const args: number[] = [];
  const abuf = Buffer.alloc(8 * 64);
  const out = Buffer.alloc(LIBRARY_RESPONSE_BYTES);
  for (;;) {
    if (!readAll(req, head, 8)) break;
    const index = head.readUInt32LE(0);
    if (index === 0xffffffff) break;
    if (index === LIBRARY_BATCH) {
      if (!serveBatch(req, resp, k, names, head.readUInt32LE(4))) break;
      continue;
    }
    const n = head.readUInt32LE(4);
    if (n > 64 || !readAll(req, abuf, 8 * n)) break;
    args.length = n;
    for (let i = 0; i < n; i++) args[i] = abuf.readDoubleLE(8 * i);
    const status = k.call(names[index]!, args);
    out.writeInt32LE(status, 0);
    for (let i = 0; i < OUT_SLOTS; i++) out.writeDoubleLE(k.out[i]!, 8 + 8 * i);
    writeSync(resp, out);
  }
  closeSync(req);
  closeSync(resp);
}

main();
