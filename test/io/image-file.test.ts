import pngjs from 'pngjs';
import { describe, expect, it } from 'vitest';
import { IMAGE_PIXEL_BUDGET } from '../../src/core/budgets.js';
import { UserError } from '../../src/core/errors.js';
import { formatPgm, formatPng, parsePgm, parsePng, pngSize } from '../../src/io/image-file.js';

const bytes = (s: string): Uint8Array => Uint8Array.from(s, (c) => c.charCodeAt(0));

describe('PGM grey maps', () => {
  it('parses a plain P2 file with comments as the format defines it', () => {
    // Source: Poskanzer et al., "pgm — Netpbm grayscale image format" (Netpbm documentation, 1989–2016):
    // magic P2, white space, width, height, maxval, then the grey values row by row; '#' starts a comment
    // that runs to the end of the line.
    const text = 'P2\n# a comment line\n3 2 # width height\n15\n0 1 2\n13 14 15\n';
    const image = parsePgm(bytes(text), 'a.pgm');
    expect(image.shape).toEqual([2, 3]);
    expect(image.maxValue).toBe(15);
    expect(Array.from(image.values)).toEqual([0, 1, 2, 13, 14, 15]);
  });

  it('parses P5 with one byte per value and with two bytes, most significant first, when maxval > 255', () => {
    // Source: the same Netpbm pgm documentation: in the raw format a single white-space character follows
    // maxval; each value is 1 byte if maxval < 256, else 2 bytes, most significant byte first.
    const eight = new Uint8Array([...bytes('P5 2 2 255\n'), 0, 128, 200, 255]);
    expect(Array.from(parsePgm(eight, 'e.pgm').values)).toEqual([0, 128, 200, 255]);
    const sixteen = new Uint8Array([...bytes('P5\n2 1\n65535\n'), 0x01, 0x02, 0xff, 0xfe]);
    const image = parsePgm(sixteen, 's.pgm');
    expect(Array.from(image.values)).toEqual([0x0102, 0xfffe]);
    expect(image.maxValue).toBe(65535);
  });

  it('round-trips through its writer in 8 and 16 bits', () => {
    const values = Float64Array.from({ length: 12 }, (_, i) => (i * 37) % 256);
    const back = parsePgm(formatPgm([3, 4], values), 'r.pgm');
    expect(back.shape).toEqual([3, 4]);
    expect(Array.from(back.values)).toEqual(Array.from(values));
    const deep = Float64Array.from({ length: 6 }, (_, i) => i * 10000);
    expect(Array.from(parsePgm(formatPgm([2, 3], deep, 65535), 'd.pgm').values)).toEqual(Array.from(deep));
    expect(new TextDecoder().decode(formatPgm([1, 2], [0, 1]).subarray(0, 11))).toBe('P5\n2 1\n255\n');
  });

  it.each([
    ['P6\n1 1\n255\n\0\0\0', /not a PGM grey map/],
    ['P5\n2 2\n255\n\x01', /truncated PGM/],
    ['P2\n2 1\n255\n1\n', /truncated PGM/],
    ['P2\n2 1\n255\n1 x\n', /'x' is not a whole number/],
    ['P2\n2 1\n10\n1 11\n', /exceeds maxval 10/],
    ['P2\n0 1\n255\n', /bad PGM width '0'/],
  ])('refuses a broken PGM with a one-line error (%#)', (text, message) => {
    let caught: unknown;
    try {
      parsePgm(bytes(text), 'bad.pgm');
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(UserError);
    expect((caught as UserError).describe()).toMatch(/^bad\.pgm: /);
    expect((caught as UserError).describe()).toMatch(message);
  });
});

describe('PNG images', () => {
  it('round-trips 8-bit and 16-bit grayscale through its writer', async () => {
    const values = Float64Array.from({ length: 20 }, (_, i) => (i * 13) % 256);
    const png8 = await formatPng([4, 5], values, 8);
    // Source: PNG specification (W3C, "Portable Network Graphics (PNG) Specification", 2003), 5.2: the
    // signature is 137 80 78 71 13 10 26 10; IHDR holds bit depth then colour type 0 (greyscale).
    expect(Array.from(png8.subarray(0, 8))).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
    expect([png8[24], png8[25]]).toEqual([8, 0]);
    const back8 = await parsePng(png8, 'a.png');
    expect(back8.shape).toEqual([4, 5]);
    expect(back8.maxValue).toBe(255);
    expect(Array.from(back8.values)).toEqual(Array.from(values));
    const deep = Float64Array.from({ length: 6 }, (_, i) => [0, 1, 255, 256, 40000, 65535][i]);
    const png16 = await formatPng([2, 3], deep, 16);
    expect([png16[24], png16[25]]).toEqual([16, 0]);
    const back16 = await parsePng(png16, 'b.png');
    expect(back16.maxValue).toBe(65535);
    expect(Array.from(back16.values)).toEqual(Array.from(deep));
  });

  it('turns colour into luminance with the BT.601 weights', async () => {
    // Source: ITU-R Recommendation BT.601, "Studio encoding parameters of digital television", luma
    // Y = 0.299 R + 0.587 G + 0.114 B.
    const { PNG } = pngjs;
    const png = new PNG({ width: 3, height: 1 });
    const rgba = [255, 0, 0, 255, 0, 255, 0, 255, 10, 20, 30, 128];
    png.data = Buffer.from(rgba);
    const encoded = PNG.sync.write(png, { colorType: 6 });
    const image = await parsePng(new Uint8Array(encoded), 'c.png');
    expect(image.values[0]).toBeCloseTo(0.299 * 255, 10);
    expect(image.values[1]).toBeCloseTo(0.587 * 255, 10);
    expect(image.values[2]).toBeCloseTo(0.299 * 10 + 0.587 * 20 + 0.114 * 30, 10);
  });

  it('refuses bytes that are not a PNG', async () => {
    await expect(parsePng(bytes('not a png at all'), 'x.png')).rejects.toThrow(/not a readable PNG/);
    await expect(parsePng(bytes('not a png at all'), 'x.png')).rejects.toBeInstanceOf(UserError);
  });
});

describe('image size budget, checked from the header before decoding', () => {
  it('reads width and height from the IHDR chunk as pngjs does', async () => {
    const bytes = await formatPng([7, 13], new Float64Array(91), 8);
    // Reference: pngjs's own decoder on the same bytes.
    const decoded = pngjs.PNG.sync.read(Buffer.from(bytes));
    expect(pngSize(bytes)).toEqual({ width: decoded.width, height: decoded.height });
    expect(pngSize(Uint8Array.from([1, 2, 3]))).toBeUndefined();
  });

  it('refuses a 20000 × 20000 PNG from its header alone', async () => {
    const bytes = await formatPng([2, 2], new Float64Array(4), 8);
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    view.setUint32(16, 20_000);
    view.setUint32(20, 20_000);
    // The IHDR checksum is now wrong and the raster far too short: a decoder would fail differently (or
    // allocate 1.6 GB first). The size check comes first and says why.
    let caught: unknown;
    try {
      await parsePng(bytes, 'huge.png');
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(UserError);
    expect((caught as UserError).describe()).toBe(
      `huge.png: the image is 20000 × 20000 = 400000000 pixels, above the limit of ${IMAGE_PIXEL_BUDGET} pixels an image; scale it down or cut it into tiles`,
    );
  });

  it('refuses a PGM above the budget before reading its raster', () => {
    const head = new TextEncoder().encode('P5\n20000 20000\n255\n');
    expect(() => parsePgm(head, 'huge.pgm')).toThrow(/20000 × 20000 = 400000000 pixels, above the limit/);
    // At the limit itself the header passes and the missing raster is what is wrong.
    const side = Math.sqrt(IMAGE_PIXEL_BUDGET);
    expect(() => parsePgm(new TextEncoder().encode(`P5\n${side} ${side}\n255\n`), 'edge.pgm')).toThrow(
      /truncated PGM/,
    );
  });
});
