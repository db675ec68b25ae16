/**
 * A small seeded generator (xoshiro128**, D. Blackman and S. Vigna, 2018) so that random cases are the same
 * on every machine and every run. Not for cryptography.
 */
export class Rng {
  private s = new Uint32Array(4);

  constructor(seed: number) {
    // splitmix32 to spread the seed over the state.
    let x = seed >>> 0;
    for (let i = 0; i < 4; i++) {
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      this.s[i] = (z ^ (z >>> 16)) >>> 0;
    }
  }

  /** The next 32 random bits. */
  nextU32(): number {
    const s = this.s;
    const result = Math.imul(rotl(Math.imul(s[1]!, 5) >>> 0, 7), 9) >>> 0;
    const t = (s[1]! << 9) >>> 0;
    s[2] = (s[2]! ^ s[0]!) >>> 0;
    s[3] = (s[3]! ^ s[1]!) >>> 0;
    s[1] = (s[1]! ^ s[2]!) >>> 0;
    s[0] = (s[0]! ^ s[3]!) >>> 0;
    s[2] = (s[2]! ^ t) >>> 0;
    s[3] = rotl(s[3]!, 11);
    return result;
  }

  /** A double uniform in [0, 1) with 53 random bits. */
  uniform(): number {
    const hi = this.nextU32() >>> 5;
    const lo = this.nextU32() >>> 6;
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /** Uniform in [a, b). */
  between(a: number, b: number): number {
    return a + (b - a) * this.uniform();
  }

  /** 10^u with u uniform in [lo, hi): log-uniform magnitudes. */
  logUniform(lo: number, hi: number): number {
    return Math.pow(10, this.between(lo, hi));
  }

  /** An integer in [0, n). */
  below(n: number): number {
    return Math.floor(this.uniform() * n);
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
