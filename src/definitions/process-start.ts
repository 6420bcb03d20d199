/**
 * Starting a process environment's program. Python takes a few hundred milliseconds to start
 * and import a user's script, about as long as a worker thread takes to load reckon's
 * definitions layer; a worker that runs a process environment therefore starts the program
 * first, from the definition's JSON alone (this module imports nothing heavy), and the
 * builder takes it over when it gets there (process-environment.ts), so the two overlap.
 */
import { existsSync } from 'node:fs';
import path from 'node:path';
import { InputError } from '../errors.js';
import type { DefinitionSource } from './built.js';
import { ProcessConnection } from './process-connection.js';

let keepConnections = false;
let early: { key: string; connection: ProcessConnection } | null = null;

/** Called by worker threads that run episodes: process environments built here stay running. */
export function keepProcessConnections(): void {
  keepConnections = true;
}

/** Whether this thread keeps the programs it starts (a worker that runs episodes). */
export function keepsProcessConnections(): boolean {
  return keepConnections;
}

/** Arguments starting with ./ or ../ are files relative to the definition's folder: resolved and checked. */
export function resolveCommand(command: readonly string[], source: DefinitionSource): string[] {
  return command.map((arg, i) => {
    if (!arg.startsWith('./') && !arg.startsWith('../')) return arg;
    const absolute = path.resolve(source.baseDir, arg);
    if (!existsSync(absolute)) {
      throw new InputError(source.label, `command[${i}]: "${arg}" not found (looked for ${absolute})`);
    }
    return absolute;
  });
}

/** The program's short name: its script when one is named, else the program. */
export function programLabel(command: readonly string[]): string {
  const script = command.slice(1).find((arg) => /\.(py|pyw)$/.test(arg));
  return path.basename(script ?? command[0]);
}

function keyOf(command: readonly string[], baseDir: string): string {
  return JSON.stringify([command, baseDir]);
}

/**
 * Starts the program of a `"kind": "process"` definition given as JSON, before the definition
 * is checked, and keeps it for {@link takeStartedProgram}. Returns null (and starts nothing)
 * for anything else, or a command the builder will refuse: the builder then reports it.
 */
export function startProgramEarly(json: unknown, source: DefinitionSource): ProcessConnection | null {
  const def = json as { kind?: unknown; command?: unknown } | null;
  if (def?.kind !== 'process' || !Array.isArray(def.command) || def.command.length === 0) return null;
  if (!def.command.every((arg) => typeof arg === 'string' && arg.length > 0)) return null;
  const given = def.command as string[];
  let command: string[];
  try {
    command = resolveCommand(given, source);
  } catch {
    return null;
  }
  early?.connection.kill();
  const connection = new ProcessConnection(command, source.baseDir, programLabel(given));
  early = { key: keyOf(command, source.baseDir), connection };
  return connection;
}

/** The program started early for this command and folder, handed over once; null when there is none. */
export function takeStartedProgram(command: readonly string[], baseDir: string): ProcessConnection | null {
  if (!early || early.key !== keyOf(command, baseDir)) return null;
  const { connection } = early;
  early = null;
  return connection;
}
