/**
 * How a run's random draws are addressed (DEVELOPERS.md, "Seeding scheme"):
 * - `step`: episode i's environment draws are the successive outputs of one stream per
 *   (seed, ENV, i), the policy's of one per (seed, POLICY, i): the draw of step t is the t-th.
 * - `visit`: the draw for the k-th visit of state s in episode i is computed from
 *   (seed, stream, i, s, k) by a counter-based generator (engine/visit-noise.ts), so two
 *   policies that reach a state see the same noise there, whatever happened before.
 * A run's result is a pure function of (env, policy, seed, episodes, noise mode).
 */
export const NOISE_MODES = ['step', 'visit'] as const;

export type NoiseMode = (typeof NOISE_MODES)[number];

/** What a stored run without a recorded mode used: every run before visit noise existed. */
export const LEGACY_NOISE: NoiseMode = 'step';
