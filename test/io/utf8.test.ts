import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { decodeUtf8, firstInvalidUtf8, Utf8Stream } from '../../src/io/utf8.js';

function fault(run: () => unknown): UserError {
  try {
    run();
  } catch (error) {
    if (error instanceof UserError) return error;
    throw error;
  }
  throw new Error('expected a UserError');
}

describe('UTF-8 checks of text inputs', () => {
  it('agrees with the WHATWG fatal decoder on random bytes (Encoding Standard, WHATWG, 2024)', () => {
    // Reference: Node's TextDecoder('utf-8', {fatal: true}), an implementation of the WHATWG Encoding
    // Standard's UTF-8 decoder (which follows RFC 3629: no overlongs, no surrogates, nothing above U+10FFFF).
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 24 }), (bytes) => {
        let valid = true;
        try {
          new TextDecoder('utf-8', { fatal: true }).decode(bytes);
        } catch {
          valid = false;
        }
        expect(firstInvalidUtf8(bytes) < 0).toBe(valid);
      }),
      { numRuns: 3000 },
    );
  });

  it.each([
    [[0xc0, 0xaf], 0], // overlong '/' (RFC 3629, section 10, "Security considerations")
    [[0x41, 0xed, 0xa0, 0x80], 1], // a UTF-16 surrogate, U+D800
    [[0x41, 0x42, 0xf4, 0x90, 0x80, 0x80], 2], // U+110000, above the last code point
    [[0xe2, 0x82], 0], // cut short
  ])('finds the first invalid byte of %j at %i', (bytes, at) => {
    expect(firstInvalidUtf8(Uint8Array.from(bytes))).toBe(at);
  });

  it('names the line of the first invalid byte in a whole file', () => {
    const bytes = Uint8Array.from([
      ...Buffer.from('sample,label,x\r\na,é,1\nb,'),
      0xff,
      ...Buffer.from(',2\n'),
    ]);
    const e = fault(() => decodeUtf8(bytes, 'f.csv'));
    expect(e.describe()).toBe(
      'f.csv:3: is not valid UTF-8 text (an invalid byte on this line); save the file as UTF-8',
    );
    expect(decodeUtf8(Buffer.from('a,é\n'), 'f.csv')).toBe('a,é\n');
  });

  it('streams chunks that cut a sequence in two, and names the line of a fault in a later chunk', () => {
    const text = Buffer.from('x\nü\nü\n');
    const stream = new Utf8Stream('s.csv');
    // Cut inside the first ü (bytes c3 bc).
    expect(stream.decode(text.subarray(0, 3)) + stream.decode(text.subarray(3)) + stream.end()).toBe(
      'x\nü\nü\n',
    );
    const broken = new Utf8Stream('s.csv');
    broken.decode(Buffer.from('a\r'));
    broken.decode(Buffer.from('\nb\nc'));
    expect(fault(() => broken.decode(Uint8Array.from([0x0a, 0x64, 0x80]))).line).toBe(4);
    const cut = new Utf8Stream('s.csv');
    cut.decode(Uint8Array.from([0x61, 0x0a, 0xe2, 0x82]));
    expect(fault(() => cut.end()).line).toBe(2);
  });
});

describe('Utf8Stream against the WHATWG fatal decoder, chunk by chunk', () => {
  it('accepts and decodes exactly what the fatal decoder accepts, whatever the cuts', () => {
    // Reference: TextDecoder('utf-8', {fatal: true}) over the whole input (WHATWG Encoding Standard, 2024).
    const piece = fc.oneof(
      fc.constantFrom(...['a', '\n', 'é', '€', '😀', '\r\n'].map((t) => [...Buffer.from(t)])),
      fc.array(fc.integer({ min: 0, max: 255 }), { maxLength: 2 }),
    );
    fc.assert(
      fc.property(
        fc.array(piece, { maxLength: 12 }),
        fc.array(fc.integer({ min: 1, max: 5 }), { minLength: 1 }),
        (pieces, cuts) => {
          const bytes = Uint8Array.from(pieces.flat());
          let expected: string | undefined;
          try {
            expected = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
          } catch {
            expected = undefined;
          }
          const stream = new Utf8Stream('s.txt');
          let got: string | undefined = '';
          try {
            let at = 0;
            for (let k = 0; at < bytes.length; k++) {
              const next = Math.min(bytes.length, at + cuts[k % cuts.length]);
              got += stream.decode(bytes.subarray(at, next));
              at = next;
            }
            got += stream.end();
          } catch (error) {
            if (!(error instanceof UserError)) throw error;
            got = undefined;
          }
          expect(got).toBe(expected);
        },
      ),
      { numRuns: 3000 },
    );
  });
});
