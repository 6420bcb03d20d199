/**
 * One running environment program and the line protocol with it: newline-delimited JSON on
 * its stdin and stdout (python/reckon_bridge.py documents the messages). Its stderr is passed
 * on to ours, each line prefixed with the program's name, and its last lines are kept for
 * error messages. While no request is waiting the program does not keep Node's event loop
 * alive, so a command that is done exits (the program then reads end-of-file and ends).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

/** Version of the line protocol this reckon speaks; the helper answers with its own. */
export const PROTOCOL_VERSION = 2;

/** The folder of reckon_bridge.py, put on the program's PYTHONPATH. */
export function bridgeFolder(): string {
  const here = path.dirname(fileURLToPath(import.meta.url));
  // src/definitions or dist/definitions: the helper lives in python/ at the package root.
  return path.resolve(here, '../../python');
}

/** Why the program gave no usable answer. */
export type ProcessFault =
  | { kind: 'spawn'; message: string }
  | { kind: 'exited'; code: number | null; signal: string | null; stderr: string[] }
  | { kind: 'garbage'; line: string }
  | { kind: 'late'; seconds: number; hung: HangReport | null; stderr: string[] };

/** What the helper says about where it was when reckon's timeout asked (SIGUSR1). */
export interface HangReport {
  readonly index: number;
  readonly step: number;
  /** The call into the user's code it is stuck in: reset, step, act, state_name, make_env. */
  readonly call?: string;
  readonly traceback: readonly string[];
}

export class ProcessFaultError extends Error {
  constructor(readonly fault: ProcessFault) {
    super(describeFault(fault));
    this.name = 'ProcessFaultError';
  }
}

/** How long the helper may take to report where it hung before it is killed. */
const HANG_REPORT_MS = 1000;
const STDERR_KEPT = 12;

export class ProcessConnection {
  private readonly child: ChildProcess;
  private pendingText = '';
  private readonly lines: string[] = [];
  private waiter: (() => void) | null = null;
  private fault: ProcessFault | null = null;
  private readonly stderrTail: string[] = [];
  private stderrPartial = '';
  private closed = false;

  constructor(command: readonly string[], cwd: string, readonly prefix: string) {
    const pythonPath = [bridgeFolder(), process.env.PYTHONPATH].filter(Boolean).join(path.delimiter);
    this.child = spawn(command[0], command.slice(1), {
      cwd,
      stdio: ['pipe', 'pipe', 'pipe'],
      env: { ...process.env, PYTHONPATH: pythonPath, PYTHONUNBUFFERED: '1' },
    });
    this.child.on('error', (e: NodeJS.ErrnoException) => {
      const message = e.code === 'ENOENT' ? `command "${command[0]}" not found (is it installed and on PATH?)` : e.message;
      this.setFault({ kind: 'spawn', message });
    });
    this.child.stdout!.setEncoding('utf8');
    this.child.stdout!.on('data', (chunk: string) => this.onStdout(chunk));
    this.child.stderr!.setEncoding('utf8');
    this.child.stderr!.on('data', (chunk: string) => this.onStderr(chunk));
    this.child.stdin!.on('error', () => {}); // a program that died: reported by 'exit'
    this.child.on('exit', (code, signal) => {
      this.flushStderr();
      this.setFault({ kind: 'exited', code, signal, stderr: [...this.stderrTail] });
    });
    this.idle();
  }

  get pid(): number {
    return this.child.pid ?? 0;
  }

  /** Sends one message (already JSON text, one line). */
  send(json: string): void {
    if (this.fault || this.closed) return;
    this.child.stdin!.write(json + '\n');
  }

  /**
   * The next message. Rejects with a ProcessFaultError when the program exits, prints a line
   * that is not a JSON object, or sends nothing for `timeoutSeconds` (it is then asked where
   * it is, with SIGUSR1, and killed).
   */
  async receive(timeoutSeconds: number): Promise<Record<string, unknown>> {
    this.busy();
    try {
      const line = await this.nextLine(timeoutSeconds);
      let parsed: unknown;
      try {
        parsed = JSON.parse(line);
      } catch {
        parsed = null;
      }
      if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed)) {
        this.kill();
        throw new ProcessFaultError({ kind: 'garbage', line });
      }
      return parsed as Record<string, unknown>;
    } finally {
      this.idle();
    }
  }

  /** Ends the program: closes its stdin (it exits on end-of-file), and kills it if it is stuck. */
  close(): void {
    if (this.closed) return;
    this.closed = true;
    this.child.stdin!.end();
    const timer = setTimeout(() => this.kill(), 2000);
    timer.unref();
  }

  kill(): void {
    if (this.child.exitCode === null && this.child.signalCode === null) this.child.kill('SIGKILL');
  }

  private async nextLine(timeoutSeconds: number): Promise<string> {
    const deadline = performance.now() + timeoutSeconds * 1000;
    for (;;) {
      const line = this.lines.shift();
      if (line !== undefined) return line;
      if (this.fault) throw new ProcessFaultError(this.fault);
      const left = deadline - performance.now();
      if (left <= 0) throw new ProcessFaultError(await this.late(timeoutSeconds));
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, left);
        this.waiter = () => {
          clearTimeout(timer);
          resolve();
        };
      });
      this.waiter = null;
    }
  }

  /** Asks a program that answers late where it is (SIGUSR1), waits a moment for that, kills it. */
  private async late(seconds: number): Promise<ProcessFault> {
    let hung: HangReport | null = null;
    try {
      this.child.kill('SIGUSR1');
      const until = performance.now() + HANG_REPORT_MS;
      while (performance.now() < until && !hung) {
        const line = this.lines.shift();
        if (line !== undefined) {
          try {
            const report = (JSON.parse(line) as { hung?: HangReport }).hung;
            if (report) hung = report;
          } catch {
            // not the report: ignore, the program is being ended anyway
          }
          continue;
        }
        if (this.fault) break;
        await new Promise<void>((resolve) => {
          const timer = setTimeout(resolve, 20);
          this.waiter = () => {
            clearTimeout(timer);
            resolve();
          };
        });
        this.waiter = null;
      }
    } finally {
      this.kill();
    }
    return { kind: 'late', seconds, hung, stderr: [...this.stderrTail] };
  }

  private setFault(fault: ProcessFault): void {
    this.fault ??= fault;
    this.waiter?.();
  }

  private onStdout(chunk: string): void {
    const text = this.pendingText + chunk;
    const parts = text.split('\n');
    this.pendingText = parts.pop()!;
    for (const part of parts) if (part.trim() !== '') this.lines.push(part);
    this.waiter?.();
  }

  private onStderr(chunk: string): void {
    const parts = (this.stderrPartial + chunk).split('\n');
    this.stderrPartial = parts.pop()!;
    for (const line of parts) this.showStderr(line);
  }

  private flushStderr(): void {
    if (this.stderrPartial !== '') this.showStderr(this.stderrPartial);
    this.stderrPartial = '';
  }

  private showStderr(line: string): void {
    process.stderr.write(`[${this.prefix}] ${line}\n`);
    this.stderrTail.push(line);
    if (this.stderrTail.length > STDERR_KEPT) this.stderrTail.shift();
  }

  private busy(): void {
    this.child.ref();
    for (const stream of [this.child.stdout, this.child.stderr, this.child.stdin]) (stream as unknown as { ref?: () => void })?.ref?.();
  }

  private idle(): void {
    this.child.unref();
    for (const stream of [this.child.stdout, this.child.stderr, this.child.stdin]) (stream as unknown as { unref?: () => void })?.unref?.();
  }
}

/** The last lines of the program's stderr, for a message: ` (its stderr ended: …)`. */
export function stderrExcerpt(lines: readonly string[]): string {
  const useful = lines.filter((l) => l.trim() !== '').slice(-3);
  return useful.length ? `; its stderr ended: ${useful.map((l) => l.trim()).join(' | ')}` : '';
}

function describeFault(fault: ProcessFault): string {
  switch (fault.kind) {
    case 'spawn':
      return fault.message;
    case 'exited': {
      const how = fault.signal ? `was killed by ${fault.signal}` : `exited with code ${fault.code}`;
      return `the program ${how}${stderrExcerpt(fault.stderr)}`;
    }
    case 'garbage': {
      const shown = fault.line.length > 80 ? `${fault.line.slice(0, 77)}...` : fault.line;
      return `the program printed ${JSON.stringify(shown)} on its standard output, which is not reckon's protocol (print to sys.stderr, or after serve() starts, where print goes to stderr)`;
    }
    case 'late':
      return `no answer within ${fault.seconds} s (raise --step-timeout if it is only slow)`;
  }
}
