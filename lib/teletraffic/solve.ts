/**
 * Root of a continuous function with f(lo) and f(hi) of opposite sign: Illinois false position
 * (Dowell & Jarratt 1971) with a bisection step whenever the bracket does not shrink fast enough.
 */
export function solveBracketed(
  fn: (x: number) => number,
  lo: number,
  hi: number,
  options: { relativeTolerance?: number; absoluteTolerance?: number; maxIterations?: number; fLo?: number; fHi?: number } = {},
): { root: number; iterations: number } {
  const relTol = options.relativeTolerance ?? 1e-14;
  const absTol = options.absoluteTolerance ?? 0;
  const maxIterations = options.maxIterations ?? 300;
  let fa = options.fLo ?? fn(lo);
  let fb = options.fHi ?? fn(hi);
  let a = lo;
  let b = hi;
  if (fa === 0) return { root: a, iterations: 0 };
  if (fb === 0) return { root: b, iterations: 0 };
  if (Math.sign(fa) === Math.sign(fb)) throw new Error(`root not bracketed in [${lo}, ${hi}]`);
  let side = 0;
  for (let i = 1; i <= maxIterations; i++) {
    const width = Math.abs(b - a);
    let x = (a * fb - b * fa) / (fb - fa);
    if (!(x > Math.min(a, b) && x < Math.max(a, b))) x = 0.5 * (a + b);
    const fx = fn(x);
    if (fx === 0) return { root: x, iterations: i };
    if (Math.sign(fx) === Math.sign(fb)) {
      b = x;
      fb = fx;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      a = x;
      fa = fx;
      if (side === 1) fb /= 2;
      side = 1;
    }
    // Guarantee linear convergence: if a step cut the bracket by less than half, bisect once.
    if (Math.abs(b - a) > 0.5 * width) {
      const m = 0.5 * (a + b);
      const fm = fn(m);
      if (fm === 0) return { root: m, iterations: i };
      if (Math.sign(fm) === Math.sign(fb)) {
        b = m;
        fb = fm;
      } else {
        a = m;
        fa = fm;
      }
      side = 0;
    }
    const scale = Math.max(Math.abs(a), Math.abs(b));
    if (Math.abs(b - a) <= Math.max(absTol, relTol * scale)) {
      return { root: Math.abs(fa) < Math.abs(fb) ? a : b, iterations: i };
    }
  }
  return { root: Math.abs(fa) < Math.abs(fb) ? a : b, iterations: maxIterations };
}
