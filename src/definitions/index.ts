/** The definitions layer's public surface: read, parse, build, load. */
export { readDefinitionFile, parseJsonText, type DefinitionFile } from './read-file.js';
export * from './schemas.js';
export { parseEnvironment, parsePolicy } from './parse.js';
export { groupMembers, isGroupJson, parseGroupOption, readGroupOption, type GroupOption } from './policy-group.js';
export { buildEnvironment } from './build-environment.js';
export { buildPolicy } from './build-policy.js';
export { loadEnvironmentFile, loadPolicyFile, type LoadedEnvironment, type LoadedPolicy } from './load.js';
export { compileGridworld, GRID_ACTIONS, cellName } from './gridworld.js';
export { compileTabular } from './tabular.js';
export {
  resolveHorizon,
  truncationBound,
  horizonForTolerance,
  DEFAULT_TRUNCATION_TOLERANCE,
  type ResolvedHorizon,
} from './horizon.js';
export { formatZodError, describeIssues, formatPath, zodInputError } from './issues.js';
export type * from './built.js';
export type * from './finite-mdp.js';
