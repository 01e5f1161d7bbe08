import { shapeOfFamily, exponentialKernelIntegral, onOffPeakedness, survivalSquareIntegral, gammaRenewalPeakedness, shapeOfSample } from "./lib/measurement/peakedness";
const sh = shapeOfFamily("exponential", { mean: 3 });
for (const a of [1e-6, 0.01, 0.3, 1, 10, 1000]) console.log(a, exponentialKernelIntegral(sh, a), 1 / ((1 / 3) * (a + 1 / 3)));
console.log(survivalSquareIntegral(sh), 1.5);
const s = { onRate: 7, meanOn: 1, meanOff: 1.5 };
const a = 1 / s.meanOn + 1 / s.meanOff;
console.log(onOffPeakedness(s, sh), 1 + (7 * (1 / s.meanOn)) / (a * (a + 1 / 3)));
console.log(gammaRenewalPeakedness(0.5, 1, 3), gammaRenewalPeakedness(0.5, 0.001, 3));
const ln = shapeOfFamily("lognormal", { mu: 0, sigma: 1.2 }); console.log(ln.mean, Math.exp(0.72), exponentialKernelIntegral(ln, 1e-9), ln.mean ** 2);
