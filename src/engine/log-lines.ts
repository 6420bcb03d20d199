import { writeSync } from 'node:fs';

/** What a logged-episode file's header line says besides its format: the same for every recorder. */
export interface LogHeader {
  readonly discount: number;
  readonly reward_bounds?: readonly [number, number];
  readonly horizon: number;
  readonly actions: readonly string[];
  readonly description: unknown;
}

/**
 * The lines of a logged-episode file as a recorder writes them: the header first, then step lines,
 * handed to the file in pieces of about a megabyte so a long record never holds the whole file.
 */
export class LogLines {
  private pending: string;

  constructor(private readonly fd: number, header: LogHeader) {
    this.pending = `${JSON.stringify({ kind: 'header', format: 'reckon-episodes', version: 1, ...header })}\n`;
  }

  /** One line, ending in a newline. */
  add(line: string): void {
    this.pending += line;
    if (this.pending.length > 1 << 20) this.flush();
  }

  /** Writes what is pending; call it once the last line is added. */
  flush(): void {
    writeSync(this.fd, this.pending);
    this.pending = '';
  }
}
