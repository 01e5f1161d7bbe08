import gammaln from "@stdlib/math-base-special-gammaln";

export const lnGamma: (x: number) => number = gammaln;

/** log(1 - e^x) for x <= 0 without cancellation (Mächler 2012, "Accurately computing log(1 - exp(-|a|))"). */
export function log1mexp(x: number): number {
  if (x > -Math.LN2) return Math.log(-Math.expm1(x));
  return Math.log1p(-Math.exp(x));
}

/** log(e^a + e^b). */
export function logAddExp(a: number, b: number): number {
  if (a === -Infinity) return b;
  if (b === -Infinity) return a;
  const m = Math.max(a, b);
  return m + Math.log1p(Math.exp(-Math.abs(a - b)));
}

/** Compensated summation (Neumaier 1974): error about one rounding, independent of the number of terms. */
export class NeumaierSum {
  private sum = 0;
  private compensation = 0;
  add(x: number): void {
    const t = this.sum + x;
    if (Math.abs(this.sum) >= Math.abs(x)) this.compensation += this.sum - t + x;
    else this.compensation += x - t + this.sum;
    this.sum = t;
  }
  value(): number {
    return this.sum + this.compensation;
  }
}
