/**
 * Ziggurat samplers of the standard exponential and the standard normal law (Marsaglia & Tsang,
 * "The Ziggurat Method for Generating Random Variables", J. Statistical Software 5(8), 2000):
 * 256 layers for the exponential and 128 for the normal, set up exactly as in the paper. About
 * 99 % of draws cost one 32-bit word, one comparison and one multiplication; only the wedges and
 * the tail call exp or log. The 32-bit words come from the replication's own xoshiro128** stream
 * (random.ts) instead of the paper's SHR3, which answers the criticism of the original
 * implementation's generator (Leong, Zhang, Lee, Luk & Villasenor, J. Stat. Software 12(7), 2005).
 * Layer index and abscissa share the word's low bits, as in the paper; that couples them only at
 * the 2^-24 relative level of the abscissa.
 */
import type { Random } from "./random";

const M1 = 2147483648; // 2^31
const M2 = 4294967296; // 2^32

/** Right edge of the exponential ziggurat's base layer and the common layer area (from the paper). */
export const EXPONENTIAL_R = 7.697117470131487;
const EXPONENTIAL_V = 3.949659822581572e-3;
/** Right edge of the normal ziggurat's base layer and the common layer area (from the paper). */
export const NORMAL_R = 3.442619855899;
const NORMAL_V = 9.91256303526217e-3;

// The layers' acceptance bounds (k) and widths (w) are exported, with the slow paths, for loops that
// write the fast path out with the generator's words in locals (fast-loop.ts): a draw called there
// returns its double boxed.
export const ke = new Float64Array(256);
export const we = new Float64Array(256);
const fe = new Float64Array(256);
export const kn = new Float64Array(128);
export const wn = new Float64Array(128);
const fn = new Float64Array(128);

{
  let de = EXPONENTIAL_R;
  let te = de;
  const q = EXPONENTIAL_V / Math.exp(-de);
  ke[0] = (de / q) * M2;
  ke[1] = 0;
  we[0] = q / M2;
  we[255] = de / M2;
  fe[0] = 1;
  fe[255] = Math.exp(-de);
  for (let i = 254; i >= 1; i--) {
    de = -Math.log(EXPONENTIAL_V / de + Math.exp(-de));
    ke[i + 1] = (de / te) * M2;
    te = de;
    fe[i] = Math.exp(-de);
    we[i] = de / M2;
  }
}
{
  let dn = NORMAL_R;
  let tn = dn;
  const q = NORMAL_V / Math.exp(-0.5 * dn * dn);
  kn[0] = (dn / q) * M1;
  kn[1] = 0;
  wn[0] = q / M1;
  wn[127] = dn / M1;
  fn[0] = 1;
  fn[127] = Math.exp(-0.5 * dn * dn);
  for (let i = 126; i >= 1; i--) {
    dn = Math.sqrt(-2 * Math.log(NORMAL_V / dn + Math.exp(-0.5 * dn * dn)));
    kn[i + 1] = (dn / tn) * M1;
    tn = dn;
    fn[i] = Math.exp(-0.5 * dn * dn);
    wn[i] = dn / M1;
  }
}

/** Standard exponential (mean 1). */
export function zigExponential(rng: Random): number {
  const jz = rng.nextUint32();
  const iz = jz & 255;
  if (jz < ke[iz]) return jz * we[iz];
  return exponentialFix(rng, jz, iz);
}

/** zigExponential's slow path: `jz` is the word that missed the fast path, `iz` its layer. */
export function exponentialFix(rng: Random, jz: number, iz: number): number {
  for (;;) {
    if (iz === 0) return EXPONENTIAL_R - Math.log(rng.next());
    const x = jz * we[iz];
    if (fe[iz] + rng.next() * (fe[iz - 1] - fe[iz]) < Math.exp(-x)) return x;
    jz = rng.nextUint32();
    iz = jz & 255;
    if (jz < ke[iz]) return jz * we[iz];
  }
}

/** Standard normal (mean 0, variance 1). */
export function zigNormal(rng: Random): number {
  const hz = rng.nextUint32() | 0; // signed: the sign bit is the sign of the draw
  const iz = hz & 127;
  if (Math.abs(hz) < kn[iz]) return hz * wn[iz];
  return normalFix(rng, hz, iz);
}

/** zigNormal's slow path: `hz` is the signed word that missed the fast path, `iz` its layer. */
export function normalFix(rng: Random, hz: number, iz: number): number {
  for (;;) {
    const x = hz * wn[iz];
    if (iz === 0) {
      // Tail beyond r: Marsaglia's (1964) method, as in the paper.
      let tx = 0;
      let ty = 0;
      do {
        tx = -Math.log(rng.next()) / NORMAL_R;
        ty = -Math.log(rng.next());
      } while (ty + ty < tx * tx);
      return hz > 0 ? NORMAL_R + tx : -NORMAL_R - tx;
    }
    if (fn[iz] + rng.next() * (fn[iz - 1] - fn[iz]) < Math.exp(-0.5 * x * x)) return x;
    hz = rng.nextUint32() | 0;
    iz = hz & 127;
    if (Math.abs(hz) < kn[iz]) return hz * wn[iz];
  }
}

/**
 * Gamma(shape, 1) by Marsaglia & Tsang (ACM TOMS 26(3), 2000) with ziggurat normals; shape < 1 by
 * the u^(1/shape) boost, as Random.gamma does.
 */
export function zigGamma(rng: Random, shape: number): number {
  if (shape < 1) return zigGamma(rng, shape + 1) * Math.pow(rng.next(), 1 / shape);
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x = 0;
    let v = 0;
    do {
      x = zigNormal(rng);
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.next();
    if (u < 1 - 0.0331 * x * x * x * x) return d * v;
    if (Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v;
  }
}
