import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { formatNpy, parseNpy, readNpy, writeNpy } from '../../src/io/npy.js';
import { tempDir } from '../helpers/cli.js';

const ascii = (s: string): number[] => Array.from(s, (c) => c.charCodeAt(0));

describe('NPY format version 1.0', () => {
  it('writes a known 2 × 3 float64 array byte for byte as the specification lays it out', () => {
    // Source: Kern, "NEP 1 — A simple file format for NumPy arrays", 2007, and numpy/lib/format.py
    // (format version 1.0): magic \x93NUMPY, bytes 1 0, header length as little-endian uint16, the header
    // dict padded with spaces and ended by \n so that 10 + header length is divisible by 64, then the data.
    const dict = "{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), }"; // 59 characters
    const expected = [
      0x93,
      ...ascii('NUMPY'),
      0x01,
      0x00,
      0x76,
      0x00, // header length 118 = 128 − 10
      ...ascii(dict),
      ...ascii(' '.repeat(58)),
      0x0a,
      // IEEE 754 binary64, little-endian: 1, 2, 3, 4, 5, 6.5
      0,
      0,
      0,
      0,
      0,
      0,
      0xf0,
      0x3f,
      0,
      0,
      0,
      0,
      0,
      0,
      0x00,
      0x40,
      0,
      0,
      0,
      0,
      0,
      0,
      0x08,
      0x40,
      0,
      0,
      0,
      0,
      0,
      0,
      0x10,
      0x40,
      0,
      0,
      0,
      0,
      0,
      0,
      0x14,
      0x40,
      0,
      0,
      0,
      0,
      0,
      0,
      0x1a,
      0x40,
    ];
    const bytes = formatNpy([2, 3], [1, 2, 3, 4, 5, 6.5]);
    expect(bytes.length).toBe(128 + 48);
    expect(Array.from(bytes)).toEqual(expected);
  });

  it('writes a 1-D shape with the trailing comma of a one-element tuple', () => {
    // Source: numpy/lib/format.py writes the shape as the repr of a Python tuple, so (3,) for one axis.
    const bytes = formatNpy([3], [0.5, -2, 1e300]);
    const dict = "{'descr': '<f8', 'fortran_order': False, 'shape': (3,), }";
    expect(Array.from(bytes.subarray(0, 128))).toEqual([
      0x93,
      ...ascii('NUMPY'),
      1,
      0,
      0x76,
      0,
      ...ascii(dict),
      ...ascii(' '.repeat(60)),
      0x0a,
    ]);
    // 0.5 = 0x3fe0000000000000, −2 = 0xc000000000000000, 1e300 = 0x7e37e43c8800759c (IEEE 754 binary64).
    expect(Buffer.from(bytes.subarray(128)).toString('hex')).toBe(
      '000000000000e03f00000000000000c09c7500883ce4377e',
    );
  });

  it('aligns every header to 64 bytes and reads back what it wrote (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 5 }), { minLength: 1, maxLength: 4 }),
        fc.integer({ min: 0, max: 1000 }),
        (shape, seed) => {
          const count = shape.reduce((a, b) => a * b, 1);
          const data = Float64Array.from(
            { length: count },
            (_, i) => Math.sin(seed + i) * 10 ** ((i % 7) - 3),
          );
          const bytes = formatNpy(shape, data);
          const headerLength = bytes[8] | (bytes[9] << 8);
          expect((10 + headerLength) % 64).toBe(0);
          expect(bytes[10 + headerLength - 1]).toBe(0x0a);
          const back = parseNpy(bytes, 'x.npy');
          expect(back.shape).toEqual(shape);
          expect(Array.from(back.data)).toEqual(Array.from(data));
        },
      ),
      { numRuns: 100 },
    );
  });

  it('reads other dtypes, big-endian, Fortran order and version 2.0 headers', () => {
    const header = (dict: string, major = 1): Uint8Array => {
      const pre = major === 1 ? 10 : 12;
      const total = Math.ceil((pre + dict.length + 1) / 64) * 64;
      const out = new Uint8Array(total);
      out.set([0x93, ...ascii('NUMPY'), major, 0]);
      const view = new DataView(out.buffer);
      if (major === 1) view.setUint16(8, total - pre, true);
      else view.setUint32(8, total - pre, true);
      out.set(ascii(dict.padEnd(total - pre - 1, ' ') + '\n'), pre);
      return out;
    };
    const join2 = (a: Uint8Array, b: Uint8Array): Uint8Array => {
      const out = new Uint8Array(a.length + b.length);
      out.set(a);
      out.set(b, a.length);
      return out;
    };
    // Big-endian int32, Fortran order, shape (2, 3): memory holds column after column.
    // Source: NEP 1 (Kern, 2007): fortran_order True means the data are stored with the first axis fastest.
    const be = new Uint8Array(24);
    const dv = new DataView(be.buffer);
    for (const [i, v] of [0, 3, 1, 4, 2, 5].entries()) dv.setInt32(4 * i, v, false);
    const f = parseNpy(
      join2(header("{'descr': '>i4', 'fortran_order': True, 'shape': (2, 3), }"), be),
      'f.npy',
    );
    expect(f.shape).toEqual([2, 3]);
    expect(Array.from(f.data)).toEqual([0, 1, 2, 3, 4, 5]);
    const u8 = parseNpy(
      join2(
        header("{'descr': '|u1', 'fortran_order': False, 'shape': (4,), }", 2),
        Uint8Array.from([0, 7, 128, 255]),
      ),
      'u.npy',
    );
    expect(Array.from(u8.data)).toEqual([0, 7, 128, 255]);
    const f4 = new Float32Array([0.25, -1.5]);
    const r4 = parseNpy(
      join2(header("{'descr': '<f4', 'fortran_order': False, 'shape': (2,), }"), new Uint8Array(f4.buffer)),
      'f4.npy',
    );
    expect(Array.from(r4.data)).toEqual([0.25, -1.5]);
  });

  it('reads little-endian float64 in place and converts everything else', () => {
    const bytes = formatNpy([2, 2], [1, 2, 3, 4]);
    const back = parseNpy(bytes, 'a.npy');
    expect(back.data.buffer).toBe(bytes.buffer);
    expect(back.data.byteOffset).toBe(128);
    // Shifted by one byte, the same values are no longer 8-byte aligned and are copied.
    const shifted = new Uint8Array(bytes.length + 1);
    shifted.set(bytes, 1);
    const copy = parseNpy(shifted.subarray(1), 'b.npy');
    expect(copy.data.buffer).not.toBe(shifted.buffer);
    expect(Array.from(copy.data)).toEqual([1, 2, 3, 4]);
  });

  it('refuses broken files with a one-line user error naming the file', () => {
    const good = formatNpy([2], [1, 2]);
    const cases: Array<[Uint8Array, RegExp]> = [
      [Uint8Array.from(ascii('hello, not an array')), /not a \.npy file/],
      [good.subarray(0, good.length - 3), /truncated \.npy data/],
      [Uint8Array.from([...good.subarray(0, 10)]), /truncated \.npy header/],
      [formatNpy([1], [Number.NaN]), /every value must be a finite number/],
      // One float64 more than the shape (2,) holds: NEP 1 ("A simple file format for NumPy arrays",
      // Kern, 2007) defines the data as exactly the shape's elements after the header.
      [
        Uint8Array.from([...good, 0, 0, 0, 0, 0, 0, 0xf0, 0x3f]),
        /longer than its shape: \(2\) needs 16 bytes, the file has 24/,
      ],
    ];
    const complex = formatNpy([1], [1]);
    complex.set(ascii("'<c16'"), 19);
    cases.push([complex, /unsupported \.npy data type '<c16'/]);
    for (const [bytes, message] of cases) {
      let caught: unknown;
      try {
        parseNpy(bytes, 'broken.npy');
      } catch (error) {
        caught = error;
      }
      expect(caught).toBeInstanceOf(UserError);
      expect((caught as UserError).describe()).toMatch(/^broken\.npy: /);
      expect((caught as UserError).describe()).toMatch(message);
    }
  });

  it('writes atomically to disk and reads the file back', () => {
    const dir = tempDir();
    mkdirSync(join(dir, 'sub'));
    const file = join(dir, 'sub', 'a.npy');
    writeNpy(file, [2, 2], [1, -0, 3.25, 1e-310]);
    expect(readFileSync(file).subarray(0, 6).toString('latin1')).toBe('\x93NUMPY');
    const back = readNpy(file);
    expect(back.shape).toEqual([2, 2]);
    expect(Array.from(back.data)).toEqual([1, -0, 3.25, 1e-310]);
    expect(() => readNpy(join(dir, 'missing.npy'))).toThrow(/file not found/);
    expect(() => readNpy(join(dir, 'sub'))).toThrow(/is a folder/);
  });
});
