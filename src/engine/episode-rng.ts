import { createRequire } from 'node:module';
import type { Rng, UniformSource } from '../plugin.js';
import { Xoshiro128 } from './xoshiro128.js';
import { binomialDraw } from './binomial-btrd.js';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type UniformConstructor = new (...args: any[]) => UniformSource;

/**
 * Adds the named distributions of {@link Rng} to a generator class: they read only its
 * `uint32()`, so any stream the engine re-seeds in place (xoshiro128**, or the visit-keyed
 * generator of a code policy) gets the same samplers.
 */
export function withDistributions<B extends UniformConstructor>(Base: B) {
  return class WithDistributions extends Base implements Rng {
    /** Uniform in the open interval (0, 1), so no sampler ever takes ln(0). */
    private readonly open = (): number => (this.uint32() + 0.5) * 2.3283064365386963e-10;
    private readonly bits = (): number => this.uint32();
    /** Each built on its first draw, so a plug-in loads only the samplers it uses. */
    private readonly built: Partial<Samplers> = {};
    private knuthLambda = NaN;
    private knuthLimit = 0;

    private sampler<K extends keyof Samplers>(name: K): Samplers[K] {
      return (this.built[name] ??= makeSampler(name, this.open, this.bits));
    }

    normal(mu: number, sigma: number): number {
      if (typeof mu !== 'number' || !Number.isFinite(mu)) bad('normal', 'mu', mu, 'a finite number');
      if (!isPositive(sigma)) bad('normal', 'sigma', sigma, 'a finite number > 0');
      return mu + sigma * this.sampler('normal')();
    }

    poisson(lambda: number): number {
      if (!isPositive(lambda)) bad('poisson', 'lambda', lambda, 'a finite number > 0');
      if (lambda >= 30) return this.sampler('poisson')(lambda);
      // Below 30, stdlib's own method: Knuth's product of uniforms (TAOCP vol. 2, 3.4.1), which
      // stdlib's knuth.js runs recomputing e^-lambda (its exp) at every factor; here it is
      // computed once per lambda with the same exp, so the draws are the same, about 2× sooner.
      if (lambda !== this.knuthLambda) {
        this.knuthLambda = lambda;
        this.knuthLimit = stdlib('exp')(-lambda);
      }
      const limit = this.knuthLimit;
      let product = this.open();
      let k = 0;
      while (product > limit) {
        k++;
        product *= this.open();
      }
      return k;
    }

    exponential(rate: number): number {
      if (!isPositive(rate)) bad('exponential', 'rate', rate, 'a finite number > 0');
      return this.sampler('exponential')(rate);
    }

    gamma(shape: number, scale: number): number {
      if (!isPositive(shape)) bad('gamma', 'shape', shape, 'a finite number > 0');
      if (!isPositive(scale)) bad('gamma', 'scale', scale, 'a finite number > 0');
      return scale * this.standardGamma(shape);
    }

    beta(a: number, b: number): number {
      if (!isPositive(a)) bad('beta', 'a', a, 'a finite number > 0');
      if (!isPositive(b)) bad('beta', 'b', b, 'a finite number > 0');
      return stdlib('beta')(this.open, this.sampler('normal'), a, b);
    }

    binomial(n: number, p: number): number {
      if (!(Number.isInteger(n) && n >= 0 && n <= 2147483647)) bad('binomial', 'n', n, 'an integer >= 0');
      if (!isProbability(p)) bad('binomial', 'p', p, 'a probability in [0, 1]');
      if (n === 0 || p === 0) return 0;
      if (p === 1) return n;
      return binomialDraw(this.open, n, p);
    }

    geometric(p: number): number {
      if (!isProbability(p) || p === 0) bad('geometric', 'p', p, 'a probability in (0, 1]');
      if (p === 1) return 0;
      return this.sampler('geometric')(p);
    }

    categorical(weights: ArrayLike<number>): number {
      const n = weights?.length;
      if (!(n > 0)) bad('categorical', 'weights', weights, 'a non-empty array of weights');
      let total = 0;
      for (let i = 0; i < n; i++) {
        const w = weights[i];
        if (typeof w !== 'number' || !(w >= 0 && w < Infinity)) bad('categorical', `weights[${i}]`, w, 'a finite number >= 0');
        total += w;
      }
      if (!isPositive(total)) bad('categorical', 'weights', total, 'weights with a positive finite sum');
      // One uniform; the scan stops at the first index whose running sum passes it.
      const target = this.open() * total;
      let running = 0;
      for (let i = 0; i < n - 1; i++) {
        running += weights[i];
        if (target < running) return i;
      }
      // Rounding can leave the target a hair above the last running sum: the last positive weight.
      for (let i = n - 1; i > 0; i--) if (weights[i] > 0) return i;
      return 0;
    }

    dirichlet<T extends { [i: number]: number; readonly length: number }>(alphas: ArrayLike<number>, out: T): T {
      const k = alphas?.length;
      if (!(k > 0)) bad('dirichlet', 'alphas', alphas, 'a non-empty array of concentrations');
      if (out === null || typeof out !== 'object') bad('dirichlet', 'out', out, 'an array to write the shares into');
      if (!(out.length >= k)) bad('dirichlet', 'out.length', out.length, `at least ${k}, the number of alphas`);
      for (let i = 0; i < k; i++) {
        const a = alphas[i];
        if (!isPositive(a)) bad('dirichlet', `alphas[${i}]`, a, 'a finite number > 0');
      }
      // Normalised independent Gamma(alpha_i, 1) draws (Devroye 1986, ch. XI.4).
      let total = 0;
      for (let i = 0; i < k; i++) {
        const g = this.standardGamma(alphas[i]);
        out[i] = g;
        total += g;
      }
      if (total > 0) {
        for (let i = 0; i < k; i++) out[i] /= total;
      } else {
        // Every draw underflowed (all alphas tiny): the mass falls on one component, chosen by alpha.
        const j = this.categorical(alphas);
        for (let i = 0; i < k; i++) out[i] = i === j ? 1 : 0;
      }
      return out;
    }

    bernoulli(p: number): boolean {
      if (!isProbability(p)) bad('bernoulli', 'p', p, 'a probability in [0, 1]');
      return this.sampler('bernoulli')(p) === 1;
    }

    /**
     * Gamma(shape, 1) by Marsaglia & Tsang (2000), with the boost U^(1/shape) for shape < 1:
     * exactly what @stdlib/random-base-gamma's factory does around its algorithm file.
     */
    private standardGamma(shape: number): number {
      if (shape < 1) {
        const d = shape + 1 - 1 / 3;
        return stdlib('gamma')(this.open, this.sampler('normal'), 1, d, 1 / Math.sqrt(9 * d)) * Math.pow(this.open(), 1 / shape);
      }
      const d = shape - 1 / 3;
      return stdlib('gamma')(this.open, this.sampler('normal'), 1, d, 1 / Math.sqrt(9 * d));
    }
  };
}



/** What a sampler throws on a bad parameter; the rollout wraps it with the episode and step. */
export class DistributionParameterError extends Error {
  constructor(readonly distribution: string, readonly parameter: string, readonly value: unknown, expected: string) {
    super(`rng.${distribution}: ${parameter} must be ${expected} (got ${describe(value)})`);
    this.name = 'DistributionParameterError';
  }
}

function isPositive(x: unknown): x is number {
  return typeof x === 'number' && x > 0 && x < Infinity;
}

function isProbability(x: unknown): x is number {
  return typeof x === 'number' && x >= 0 && x <= 1;
}

function bad(distribution: string, parameter: string, value: unknown, expected: string): never {
  throw new DistributionParameterError(distribution, parameter, value, expected);
}

function describe(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value);
  if (Array.isArray(value)) return `[${value.slice(0, 5).map(describe).join(', ')}${value.length > 5 ? ', ...' : ''}]`;
  return String(value);
}

type Uniform = () => number;
type Sampler1 = (a: number) => number;
type Factory<S> = (options: { prng: Uniform }) => S;

interface Stdlib {
  ziggurat: (randu: Uniform, randi: Uniform) => Uniform;
  gamma: (randu: Uniform, randn: Uniform, rate: number, d: number, c: number) => number;
  beta: (randu: Uniform, randn: Uniform, a: number, b: number) => number;
  exp: (x: number) => number;
  poisson: Factory<Sampler1>;
  exponential: Factory<Sampler1>;
  geometric: Factory<Sampler1>;
  bernoulli: Factory<Sampler1>;
}

interface Samplers {
  normal: Uniform;
  poisson: Sampler1;
  exponential: Sampler1;
  geometric: Sampler1;
  bernoulli: Sampler1;
}

const STDLIB_FILES: { readonly [K in keyof Stdlib]: readonly [file: string, member: string | null] } = {
  ziggurat: ['@stdlib/random-base-improved-ziggurat/lib/improved_ziggurat.js', null],
  gamma: ['@stdlib/random-base-gamma/lib/gamma.js', null],
  beta: ['@stdlib/random-base-beta/lib/beta.js', null],
  exp: ['@stdlib/math-base-special-exp', null],
  poisson: ['@stdlib/random-base-poisson', 'factory'],
  exponential: ['@stdlib/random-base-exponential', 'factory'],
  geometric: ['@stdlib/random-base-geometric', 'factory'],
  bernoulli: ['@stdlib/random-base-bernoulli', 'factory'],
};

const loaded: Partial<Stdlib> = {};

/**
 * One @stdlib part, loaded on its first use: each costs tens of milliseconds of module
 * loading (the Poisson factory alone about 0.1 s), paid by every worker thread, so a
 * plug-in loads only the ones it draws from (a small-mean Poisson needs just `exp`).
 */
function stdlib<K extends keyof Stdlib>(name: K): Stdlib[K] {
  let part = loaded[name];
  if (part === undefined) {
    const [file, member] = STDLIB_FILES[name];
    const exported = createRequire(import.meta.url)(file) as Record<string, unknown>;
    part = (member === null ? exported : exported[member]) as Stdlib[K];
    loaded[name] = part;
  }
  return part as Stdlib[K];
}

/** Builds one sampler of {@link Samplers} on the given stream (none draws while being built). */
function makeSampler<K extends keyof Samplers>(name: K, open: Uniform, bits: Uniform): Samplers[K] {
  if (name === 'normal') return stdlib('ziggurat')(open, bits) as Samplers[K];
  return stdlib(name as Exclude<K, 'normal'>)({ prng: open }) as Samplers[K];
}

/**
 * The generator a code environment or policy receives: a xoshiro128** stream plus the named
 * distributions of {@link Rng}. Every sampler draws only from this object's own state, which
 * the engine re-seeds in place per episode, and keeps no state of its own between draws, so a
 * draw in episode i depends on nothing but (seed, stream, i).
 *
 * The algorithms are @stdlib's (pinned versions). Poisson (from mean 30), exponential,
 * geometric and Bernoulli use the packages' public factories with this stream as `prng`. Normal, gamma and
 * beta call the packages' algorithm files directly: their public factories, given an outside
 * `prng`, build a hidden Mersenne Twister (seeded once from it) for the ziggurat's block
 * index, and that hidden state would carry from one episode into the next. Here the block
 * index comes from this stream too. Binomial is stdlib's BTRD with a fix, and inversion for
 * small means (see binomial-btrd.ts).
 */
export class EpisodeRng extends withDistributions(Xoshiro128) {}

let shared: { env: EpisodeRng; policy: EpisodeRng } | null = null;

/**
 * The environment's and the policy's generators for this thread: built once and re-seeded
 * in place for every episode by the rollout loops, which run one at a time on a thread.
 */
export function pluginRngs(): { env: EpisodeRng; policy: EpisodeRng } {
  return (shared ??= { env: new EpisodeRng(), policy: new EpisodeRng() });
}
