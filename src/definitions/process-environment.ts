/**
 * Builds a `"kind": "process"` environment: starts its program, asks it what it is (the
 * `open` message of the line protocol) and checks the answer as a module environment's
 * declaration is checked. Only threads that run episodes keep the program running
 * (keepProcessConnections); elsewhere it is asked and ended.
 */
import { InputError } from '../errors.js';
import type { Environment } from '../plugin.js';
import type { DefinitionSource, ModuleEnvironment } from './built.js';
import { checkedCodeEnvironment } from './module-environment.js';
import { PROTOCOL_VERSION, ProcessConnection, ProcessFaultError } from './process-connection.js';
import type { ProcessEnvironmentDefinition } from './process-schema.js';
import { keepsProcessConnections, programLabel, resolveCommand, takeStartedProgram } from './process-start.js';

/** Seconds a program may take to start and answer `open` (Python with numpy takes well under one). */
const OPEN_TIMEOUT_SECONDS = 60;

export { keepProcessConnections, programLabel, resolveCommand } from './process-start.js';

interface OpenAnswer {
  reckon?: unknown;
  actions?: unknown;
  discount?: unknown;
  horizon?: unknown;
  reward_bounds?: unknown;
  policies?: unknown;
  error?: { call?: string; message?: string; traceback?: string[] };
}

export async function buildProcessEnvironment(def: ProcessEnvironmentDefinition, source: DefinitionSource): Promise<ModuleEnvironment> {
  const command = resolveCommand(def.command, source);
  const label = programLabel(def.command);
  const where = `environment from ${label}`;
  // A worker started the program already, while it loaded this module (process-start.ts).
  const connection = takeStartedProgram(command, source.baseDir) ?? new ProcessConnection(command, source.baseDir, label);
  const keepConnections = keepsProcessConnections();
  let answer: OpenAnswer;
  try {
    connection.send(JSON.stringify({ reckon: PROTOCOL_VERSION, op: 'open', options: def.options }));
    answer = (await connection.receive(OPEN_TIMEOUT_SECONDS)) as OpenAnswer;
  } catch (e) {
    connection.kill();
    if (e instanceof ProcessFaultError) throw new InputError(source.label, `${where}: ${openFailure(e)}`, { cause: e });
    throw e;
  }
  try {
    const env = declaredEnvironment(answer, where, source);
    const built = checkedCodeEnvironment(env, def.truncation_tolerance, where, source);
    const policies = Array.isArray(answer.policies) ? answer.policies.map(String) : [];
    return { ...built, process: { label, policies, connection: keepConnections ? connection : null } };
  } finally {
    if (!keepConnections) connection.close();
  }
}

function openFailure(e: ProcessFaultError): string {
  const fault = e.fault;
  if (fault.kind === 'exited' && fault.code === 0) {
    return `the program ended without answering reckon: does the script end with serve(make_env) (python/reckon_bridge.py)?`;
  }
  if (fault.kind === 'exited') return `the program ${e.message.replace(/^the program /, '')} before answering reckon`;
  return e.message;
}

/** The program's `open` answer as the plug-in interface's Environment (its calls go through the protocol, never here). */
function declaredEnvironment(answer: OpenAnswer, where: string, source: DefinitionSource): Environment {
  if (answer.reckon !== PROTOCOL_VERSION) {
    throw new InputError(
      source.label,
      `${where} speaks protocol version ${JSON.stringify(answer.reckon ?? null)}, and this reckon speaks ${PROTOCOL_VERSION}: import the reckon_bridge.py shipped with this reckon (reckon puts its folder on PYTHONPATH)`,
    );
  }
  if (answer.error) {
    const error = answer.error;
    const call = error.call === 'make_env' ? 'threw while being created' : `failed (${error.call})`;
    const trace = error.traceback?.length ? `\n  ${error.traceback.join('\n  ')}` : '';
    throw new InputError(source.label, `${where} ${call}: ${error.message}${trace}`);
  }
  const unreachable = () => {
    throw new Error('a process environment runs through its program (engine/process-steps.ts)');
  };
  const env: Record<string, unknown> = {
    actions: answer.actions,
    discount: answer.discount,
    reset: unreachable,
    step: unreachable,
    stateName: (state: unknown) => String(state),
  };
  if (answer.horizon !== null && answer.horizon !== undefined) env.horizon = answer.horizon;
  if (answer.reward_bounds !== null && answer.reward_bounds !== undefined) env.rewardBounds = answer.reward_bounds;
  return env as unknown as Environment;
}
