// The figures the benches report their samples by.

/** The p-th percentile by the nearest-rank method (NaN for no samples). */
export const pct = (xs: number[], p: number) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
};

/** The middle sample (the upper middle of an even count). */
export const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** Rounded to one decimal. */
export const r1 = (x: number) => Math.round(x * 10) / 10;
