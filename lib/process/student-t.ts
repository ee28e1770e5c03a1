import { ComputationError } from "@/lib/errors";

// Student's t distribution: CDF through the regularized incomplete beta function, quantile
// by bisection on the upper tail. P(T > t) = ½·I_{ν/(ν+t²)}(ν/2, ½) for t ≥ 0.

// Lanczos approximation of ln Γ (g = 7, 9 coefficients), as tabulated in Press et al.,
// Numerical Recipes (from memory); about 15 significant digits for x > 0.
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

export function lnGamma(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) throw new ComputationError(`lnGamma needs x > 0 (got ${x})`, "x");
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Continued fraction for the incomplete beta function (modified Lentz). */
function betaContinuedFraction(a: number, b: number, x: number): number {
  const tiny = 1e-300;
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 500; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const step = d * c;
    h *= step;
    if (Math.abs(step - 1) < 1e-15) return h;
  }
  return h;
}

/** Regularized incomplete beta I_x(a, b). */
export function regularizedBeta(x: number, a: number, b: number): number {
  if (!(a > 0) || !(b > 0)) throw new ComputationError("the beta parameters must be greater than 0", "a");
  if (!(x >= 0 && x <= 1)) throw new ComputationError(`x must lie in [0, 1] (got ${x})`, "x");
  if (x === 0) return 0;
  if (x === 1) return 1;
  const front = Math.exp(lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) + b * Math.log1p(-x));
  // The fraction converges fast on the side of the mean; use the symmetry I_x(a,b) = 1 − I_{1−x}(b,a).
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

function checkDf(df: number) {
  if (!(df > 0) || !Number.isFinite(df)) {
    throw new ComputationError(`degrees of freedom must be a finite number > 0 (got ${df})`, "df");
  }
}

/** P(T > t) for t ≥ 0. */
function upperTail(t: number, df: number): number {
  return 0.5 * regularizedBeta(df / (df + t * t), df / 2, 0.5);
}

export function studentTCdf(t: number, df: number): number {
  checkDf(df);
  if (Number.isNaN(t)) throw new ComputationError("t must be a number", "t");
  if (t === Infinity) return 1;
  if (t === -Infinity) return 0;
  return t >= 0 ? 1 - upperTail(t, df) : upperTail(-t, df);
}

/** The t with P(T ≤ t) = p, e.g. studentTQuantile(0.975, 9) ≈ 2.262. */
export function studentTQuantile(p: number, df: number): number {
  checkDf(df);
  if (!(p > 0 && p < 1)) throw new ComputationError(`p must lie in (0, 1) (got ${p})`, "p");
  if (p === 0.5) return 0;
  const tail = p > 0.5 ? 1 - p : p;
  let lo = 0;
  let hi = 1;
  while (upperTail(hi, df) > tail) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) throw new ComputationError("the quantile is beyond floating-point range", "p");
  }
  for (let i = 0; i < 200 && hi - lo > 1e-15 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (upperTail(mid, df) > tail) lo = mid;
    else hi = mid;
  }
  const t = (lo + hi) / 2;
  return p > 0.5 ? t : -t;
}
