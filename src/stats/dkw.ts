import { InputError } from '../errors.js';
import { requireLevel } from './interval.js';

/**
 * Half-width ε of the Dvoretzky–Kiefer–Wolfowitz band for an empirical CDF of n independent
 * returns: P(sup_x |F_n(x) − F(x)| > ε) ≤ 2e^{−2nε²} (Dvoretzky, Kiefer & Wolfowitz 1956, with
 * the tight constant 2 of Massart 1990, Annals of Probability 18(3):1269–1283), so
 * ε = √(ln(2/α)/(2n)); one-sided, ln(1/α). Valid for any distribution, discrete ones too.
 */
export function dkwEpsilon(episodes: number, level: number, oneSided = false): number {
  requireLevel(level);
  if (!(Number.isInteger(episodes) && episodes >= 1)) throw new InputError('DKW band', `needs at least one episode (got ${episodes})`);
  const alpha = 1 - level;
  return Math.sqrt(Math.log((oneSided ? 1 : 2) / alpha) / (2 * episodes));
}
