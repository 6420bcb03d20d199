/**
 * Finds where a JSON text goes wrong and says why, for error messages with a line and
 * column. V8's JSON.parse messages do not always carry a position (Node 20 prints
 * `Unexpected token '}', "..." is not valid JSON`), so this small scanner follows the
 * JSON grammar of RFC 8259 and stops at the first violation. Called only after
 * JSON.parse has failed.
 */

export interface JsonSyntaxError {
  /** Offset (UTF-16 code units) of the offending character. */
  readonly offset: number;
  readonly message: string;
}

export interface LineColumn {
  readonly line: number;
  readonly column: number;
}

/** 1-based line and column of an offset. */
export function lineColumnAt(text: string, offset: number): LineColumn {
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text[i] === '\n') {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: offset - lineStart + 1 };
}

class Stop extends Error {
  constructor(readonly offset: number, message: string) {
    super(message);
  }
}

/** The first syntax error in `text`, or null when it is valid JSON. */
export function findJsonSyntaxError(text: string): JsonSyntaxError | null {
  let i = 0;
  const fail = (message: string, at = i): never => {
    throw new Stop(at, message);
  };
  const describeHere = (): string =>
    i >= text.length ? 'the end of the file' : `'${text[i]}'`;
  const skipSpace = () => {
    while (i < text.length && ' \t\n\r'.includes(text[i])) i++;
  };

  const value = (): void => {
    skipSpace();
    const ch = text[i];
    if (ch === '{') return object();
    if (ch === '[') return array();
    if (ch === '"') return string();
    if (ch === '-' || (ch >= '0' && ch <= '9')) return number();
    for (const word of ['true', 'false', 'null']) {
      if (text.startsWith(word, i)) {
        i += word.length;
        return;
      }
    }
    if (ch === "'") fail('strings must use double quotes');
    fail(`expected a value, found ${describeHere()}`);
  };

  const object = (): void => {
    i++; // {
    skipSpace();
    if (text[i] === '}') {
      i++;
      return;
    }
    for (;;) {
      skipSpace();
      if (text[i] === '}') fail('trailing comma before }');
      if (text[i] !== '"') fail(`expected a double-quoted property name, found ${describeHere()}`);
      string();
      skipSpace();
      if (text[i] !== ':') fail(`expected ':' after the property name, found ${describeHere()}`);
      i++;
      value();
      skipSpace();
      if (text[i] === ',') {
        i++;
        continue;
      }
      if (text[i] === '}') {
        i++;
        return;
      }
      fail(`expected ',' or '}' after a property value, found ${describeHere()}`);
    }
  };

  const array = (): void => {
    i++; // [
    skipSpace();
    if (text[i] === ']') {
      i++;
      return;
    }
    for (;;) {
      skipSpace();
      if (text[i] === ']') fail('trailing comma before ]');
      value();
      skipSpace();
      if (text[i] === ',') {
        i++;
        continue;
      }
      if (text[i] === ']') {
        i++;
        return;
      }
      fail(`expected ',' or ']' after an array element, found ${describeHere()}`);
    }
  };

  const string = (): void => {
    const start = i;
    i++; // "
    while (i < text.length) {
      const ch = text[i];
      if (ch === '"') {
        i++;
        return;
      }
      if (ch === '\\') {
        const escape = text[i + 1];
        if (escape === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) fail('bad \\u escape in string');
          i += 6;
        } else if (escape !== undefined && '"\\/bfnrt'.includes(escape)) {
          i += 2;
        } else {
          fail(`bad escape '\\${escape ?? ''}' in string`);
        }
        continue;
      }
      if (ch < ' ') fail(ch === '\n' ? 'string not closed before the end of the line' : 'control character in string');
      i++;
    }
    fail('string not closed', start);
  };

  const number = (): void => {
    const match = /^-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?/.exec(text.slice(i));
    if (!match) fail('invalid number');
    i += match![0].length;
    if (i < text.length && /[0-9A-Za-z.]/.test(text[i])) fail('invalid number');
  };

  try {
    if (text.charCodeAt(0) === 0xfeff) i = 1;
    value();
    skipSpace();
    if (i < text.length) fail(`unexpected ${describeHere()} after the end of the JSON value`);
    return null;
  } catch (e) {
    if (e instanceof Stop) return { offset: e.offset, message: e.message };
    throw e;
  }
}
