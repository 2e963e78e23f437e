import { UserError } from '../core/errors.js';

/**
 * Text inputs must be UTF-8 (RFC 3629, "UTF-8, a transformation format of ISO 10646", Yergeau, 2003). A lenient
 * decoder turns every invalid byte into U+FFFD, so a label or a sample id would silently change; here the
 * decoder is fatal and the error names the file and the line of the first invalid byte. Line breaks are ASCII
 * bytes, which never occur inside a multi-byte sequence, so lines can be counted on the bytes.
 */

/** Index of the first byte of `bytes` that is not part of valid UTF-8 from `from` on, or −1. */
export function firstInvalidUtf8(bytes: Uint8Array, from = 0): number {
  let i = from;
  const n = bytes.length;
  // Invariant: bytes[from, i) is valid UTF-8 made of whole sequences.
  while (i < n) {
    const b = bytes[i];
    if (b < 0x80) {
      i++;
      continue;
    }
    let need: number;
    let min: number;
    if (b >= 0xc2 && b <= 0xdf) {
      need = 1;
      min = 0x80;
    } else if (b >= 0xe0 && b <= 0xef) {
      need = 2;
      min = 0x800;
    } else if (b >= 0xf0 && b <= 0xf4) {
      need = 3;
      min = 0x10000;
    } else return i;
    if (i + need >= n) return i;
    let code = b & (0x3f >> need);
    for (let k = 1; k <= need; k++) {
      const c = bytes[i + k];
      if (c === undefined || (c & 0xc0) !== 0x80) return i;
      code = (code << 6) | (c & 0x3f);
    }
    // Overlong forms, surrogates and code points beyond U+10FFFF are invalid (RFC 3629, section 3).
    if (code < min || (code >= 0xd800 && code <= 0xdfff) || code > 0x10ffff) return i;
    i += need + 1;
  }
  return -1;
}

/** Line breaks (LF, CR LF or a lone CR, each counted once) in bytes[from, to). */
export function lineBreaks(bytes: Uint8Array, from = 0, to = bytes.length): number {
  let count = 0;
  for (let i = from; i < to; i++) {
    const b = bytes[i];
    if (b === 10) count++;
    else if (b === 13 && bytes[i + 1] !== 10) count++;
  }
  return count;
}

/** The one-line error for invalid UTF-8 at `line`. */
export function invalidUtf8Error(file: string, line: number): UserError {
  return new UserError('is not valid UTF-8 text (an invalid byte on this line); save the file as UTF-8', {
    file,
    line,
  });
}

/** Decodes a whole file's bytes as UTF-8, or throws the error naming the file and line of the first fault. */
export function decodeUtf8(bytes: Uint8Array, file: string): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    const at = firstInvalidUtf8(bytes);
    throw invalidUtf8Error(file, 1 + lineBreaks(bytes, 0, at < 0 ? bytes.length : at));
  }
}

/**
 * A fatal streaming decoder that knows the line of a fault: `decode(chunk)` returns the text of the chunk
 * (a sequence cut between chunks is finished by the next one); `end()` checks that nothing was left cut.
 * A caller that counts lines itself passes the line the chunk starts on (`startLine`) and nothing is counted
 * here; otherwise each chunk's line breaks are counted as it passes.
 */
export class Utf8Stream {
  private readonly decoder = new TextDecoder('utf-8', { fatal: true });
  private linesBefore = 0;
  private lastWasCr = false;

  constructor(private readonly file: string) {}

  decode(chunk: Uint8Array, startLine?: number): string {
    try {
      const text = this.decoder.decode(chunk, { stream: true });
      if (startLine === undefined) this.count(chunk);
      return text;
    } catch {
      // A chunk may begin with the continuation bytes of a sequence the previous chunk started.
      let from = 0;
      while (from < 3 && from < chunk.length && (chunk[from] & 0xc0) === 0x80) from++;
      const at = firstInvalidUtf8(chunk, from);
      const end = at < 0 ? chunk.length : at;
      const line = startLine === undefined ? this.lineAt(chunk, end) : startLine + lineBreaks(chunk, 0, end);
      throw invalidUtf8Error(this.file, line);
    }
  }

  /** The rest of a cut sequence at the end of the input (an error); `line` is the last line when known. */
  end(line?: number): string {
    try {
      return this.decoder.decode();
    } catch {
      throw invalidUtf8Error(this.file, line ?? 1 + this.linesBefore);
    }
  }

  /** Line of byte `at` of the current chunk. */
  private lineAt(chunk: Uint8Array, at: number): number {
    const crLf = this.lastWasCr && chunk[0] === 10 ? 1 : 0;
    return 1 + this.linesBefore + lineBreaks(chunk, 0, at) - (at > 0 ? crLf : 0);
  }

  private count(chunk: Uint8Array): void {
    if (chunk.length === 0) return;
    // A CR at the end of the previous chunk was counted as a line break; an LF opening this one completes it.
    this.linesBefore += lineBreaks(chunk) - (this.lastWasCr && chunk[0] === 10 ? 1 : 0);
    this.lastWasCr = chunk[chunk.length - 1] === 13;
  }
}
