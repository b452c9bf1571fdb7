// Quantiles and distribution functions used by the budget and the decisions, and the coverage
// factor for a given effective degrees of freedom.
// Source: JCGM 100:2008 (GUM), Annex G: G.3 (t-distribution), G.4.1 (Welch-Satterthwaite; nu_eff
// truncated to the next lower integer before t is looked up, from memory), Table G.2 (t_p(nu)).
// Numerics from @stdlib (t quantile via the regularized incomplete beta inverse).

import stdlibTQuantile from '@stdlib/stats-base-dists-t-quantile';
import stdlibNormalCdf from '@stdlib/stats-base-dists-normal-cdf';
import stdlibNormalQuantile from '@stdlib/stats-base-dists-normal-quantile';

/** The GUM's 95.45 % (the mass of a normal distribution within +-2 sigma, rounded). */
export const DEFAULT_COVERAGE_PROBABILITY = 0.9545;

/** Quantile of Student's t with dof degrees of freedom (dof may be fractional; Infinity = normal). */
export function tQuantile(p: number, dof: number): number {
  if (dof === Infinity) return stdlibNormalQuantile(p, 0, 1);
  // The same few (p, dof) pairs come back thousands of times (drift predictions, budgets), and
  // each inversion of the incomplete beta costs tens of microseconds: remember the answers.
  // Keyed by the numbers themselves: writing p as text for a key cost more than the lookup.
  let byDof = T_QUANTILES.get(p);
  const known = byDof?.get(dof);
  if (known !== undefined) return known;
  if (T_QUANTILE_COUNT >= T_QUANTILE_MEMO_SIZE) {
    T_QUANTILES.clear();
    T_QUANTILE_COUNT = 0;
    byDof = undefined;
  }
  const t = stdlibTQuantile(p, dof);
  if (!byDof) T_QUANTILES.set(p, (byDof = new Map<number, number>()));
  byDof.set(dof, t);
  T_QUANTILE_COUNT++;
  return t;
}

const T_QUANTILE_MEMO_SIZE = 4096;
/** p -> dof -> t; a Map treats -0 as 0 and NaN as NaN, as the text keys did. */
const T_QUANTILES = new Map<number, Map<number, number>>();
let T_QUANTILE_COUNT = 0;

export function normalCdf(x: number, mu = 0, sigma = 1): number {
  return stdlibNormalCdf(x, mu, sigma);
}

export function normalQuantile(p: number, mu = 0, sigma = 1): number {
  return stdlibNormalQuantile(p, mu, sigma);
}

/**
 * Coverage factor k = t_{(1+p)/2}(nu) for a two-sided interval of coverage probability p.
 * Finite nu is truncated to the next lower integer (GUM G.4.1); nu = Infinity gives the normal
 * quantile (about 2.000 for 95.45 %). nu below 1 is refused: no t-factor exists for it.
 */
export function coverageFactor(dof: number, p: number = DEFAULT_COVERAGE_PROBABILITY): number {
  if (!(p > 0 && p < 1)) throw new Error(`coverage probability must lie strictly between 0 and 1 (got ${p})`);
  if (Number.isNaN(dof)) throw new Error('degrees of freedom is NaN');
  const q = (1 + p) / 2;
  if (dof === Infinity) return normalCoverage(q);
  // Truncate, but let a value a rounding error short of an integer count as that integer.
  const nu = Math.floor(dof + 1e-9);
  if (nu < 1) throw new Error(`degrees of freedom must be at least 1 to find a coverage factor (got ${dof})`);
  return tQuantile(q, nu);
}

/** The standard normal quantile at q, remembered: every budget with no finite degrees of freedom
 * asks for the same one or two (a bulk import, once per point; issue 8). */
function normalCoverage(q: number): number {
  const known = NORMAL_QUANTILES.get(q);
  if (known !== undefined) return known;
  if (NORMAL_QUANTILES.size >= T_QUANTILE_MEMO_SIZE) NORMAL_QUANTILES.clear();
  const z = normalQuantile(q);
  NORMAL_QUANTILES.set(q, z);
  return z;
}

const NORMAL_QUANTILES = new Map<number, number>();
