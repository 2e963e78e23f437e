import { IMAGE_PIXEL_BUDGET } from '../core/budgets.js';
import { UserError } from '../core/errors.js';
import { shown } from './csv.js';

/**
 * Grayscale image files. PGM (the Netpbm grey map: "P2" plain text or "P5" binary, maxval up to 65535,
 * 2-byte samples big-endian) is parsed here; PNG goes through pngjs. Colour PNG becomes luminance with the
 * luma weights 0.299 R + 0.587 G + 0.114 B (ITU-R Recommendation BT.601, "Studio encoding parameters of
 * digital television", 1982/2011); alpha is ignored. Values stay in the file's grey levels (0–255 for 8-bit,
 * 0–65535 for 16-bit).
 */
export interface GrayImage {
  /** [height, width]. */
  shape: [number, number];
  values: Float64Array;
  /** Largest grey level the file's format can hold (255 or 65535, or the PGM maxval). */
  maxValue: number;
}

function isSpace(c: number): boolean {
  return c === 0x20 || c === 0x09 || c === 0x0a || c === 0x0d || c === 0x0b || c === 0x0c;
}

/** Parses a PGM file (P2 or P5). */
export function parsePgm(bytes: Uint8Array, file: string): GrayImage {
  let p = 0;
  const token = (): string => {
    // Skip white space and comments (# to the end of the line).
    for (;;) {
      while (p < bytes.length && isSpace(bytes[p])) p++;
      if (p < bytes.length && bytes[p] === 0x23) {
        while (p < bytes.length && bytes[p] !== 0x0a && bytes[p] !== 0x0d) p++;
        continue;
      }
      break;
    }
    const start = p;
    while (p < bytes.length && !isSpace(bytes[p]) && bytes[p] !== 0x23) p++;
    return String.fromCharCode(...bytes.subarray(start, p));
  };
  const magic = token();
  if (magic !== 'P2' && magic !== 'P5') {
    throw new UserError(
      `not a PGM grey map (starts with '${shown(magic.slice(0, 8))}', expected P2 or P5); save it as PGM or PNG`,
      {
        file,
      },
    );
  }
  const header = (name: string, max: number): number => {
    const t = token();
    const n = Number(t);
    if (!/^\d+$/.test(t) || n < 1 || n > max) {
      throw new UserError(`bad PGM ${name} '${shown(t)}'; the header is P5 <width> <height> <maxval>`, {
        file,
      });
    }
    return n;
  };
  const width = header('width', 1 << 16);
  const height = header('height', 1 << 16);
  const maxValue = header('maxval', 65535);
  checkPixels(width, height, file);
  const count = width * height;
  // A binary raster's length is checked before the values are allocated.
  if (magic === 'P5') p++; // exactly one white-space byte separates the header from the raster
  const bytesPer = maxValue < 256 ? 1 : 2;
  if (magic === 'P5' && bytes.length - p < count * bytesPer) {
    throw new UserError(
      `truncated PGM: ${width}×${height} needs ${count * bytesPer} bytes of pixels, found ${bytes.length - p}`,
      { file },
    );
  }
  const values = new Float64Array(count);
  if (magic === 'P5') {
    // Invariant: values[0..i) hold the first i pixels.
    if (bytesPer === 1) for (let i = 0; i < count; i++) values[i] = bytes[p + i];
    else for (let i = 0; i < count; i++) values[i] = (bytes[p + 2 * i] << 8) | bytes[p + 2 * i + 1];
  } else {
    for (let i = 0; i < count; i++) {
      const t = token();
      if (t === '')
        throw new UserError(`truncated PGM: ${width}×${height} needs ${count} values, found ${i}`, { file });
      const v = Number(t);
      if (!/^\d+$/.test(t))
        throw new UserError(`PGM value ${i + 1} '${shown(t)}' is not a whole number`, { file });
      values[i] = v;
    }
  }
  for (let i = 0; i < count; i++) {
    if (values[i] > maxValue)
      throw new UserError(`PGM value ${values[i]} at pixel ${i} exceeds maxval ${maxValue}`, { file });
  }
  return { shape: [height, width], values, maxValue };
}

/** The bytes of a binary PGM (P5). Values are rounded and clamped to [0, maxValue]. */
export function formatPgm(
  shape: readonly [number, number],
  values: ArrayLike<number>,
  maxValue = 255,
): Uint8Array {
  const [height, width] = shape;
  if (values.length !== width * height)
    throw new Error(`formatPgm: ${width}×${height} needs ${width * height} values, got ${values.length}`);
  const head = new TextEncoder().encode(`P5\n${width} ${height}\n${maxValue}\n`);
  const bytesPer = maxValue < 256 ? 1 : 2;
  const out = new Uint8Array(head.length + values.length * bytesPer);
  out.set(head, 0);
  const p = head.length;
  // Invariant: the raster bytes of pixels [0, i) are written.
  for (let i = 0; i < values.length; i++) {
    const v = Math.min(maxValue, Math.max(0, Math.round(values[i])));
    if (bytesPer === 1) out[p + i] = v;
    else {
      out[p + 2 * i] = v >> 8;
      out[p + 2 * i + 1] = v & 0xff;
    }
  }
  return out;
}

/** Refuses an image above IMAGE_PIXEL_BUDGET (src/core/budgets.ts) from its header, before it is decoded. */
export function checkPixels(width: number, height: number, file: string): void {
  const pixels = width * height;
  if (pixels > IMAGE_PIXEL_BUDGET) {
    throw new UserError(
      `the image is ${width} × ${height} = ${pixels} pixels, above the limit of ${IMAGE_PIXEL_BUDGET} pixels an image; scale it down or cut it into tiles`,
      { file },
    );
  }
}

/**
 * Width and height from a PNG's IHDR chunk (the first chunk, at bytes 16–23, big-endian; W3C, "Portable
 * Network Graphics (PNG) Specification (Third Edition)", 2025, section 11.2.1), or undefined when the bytes do
 * not start as a PNG does (the decoder then words the error).
 */
export function pngSize(bytes: Uint8Array): { width: number; height: number } | undefined {
  if (bytes.length < 24) return undefined;
  for (let i = 0; i < 8; i++) if (bytes[i] !== PNG_SIGNATURE[i]) return undefined;
  if (bytes[12] !== 0x49 || bytes[13] !== 0x48 || bytes[14] !== 0x44 || bytes[15] !== 0x52) return undefined;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return { width: view.getUint32(16), height: view.getUint32(20) };
}

const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

/** Decodes a PNG (any colour type, 8 or 16 bits) into grey levels; the size is checked before decoding. */
export async function parsePng(bytes: Uint8Array, file: string): Promise<GrayImage> {
  const size = pngSize(bytes);
  if (size !== undefined) checkPixels(size.width, size.height, file);
  const { PNG } = (await import('pngjs')).default;
  let png: { width: number; height: number; data: ArrayLike<number>; depth?: number };
  try {
    png = PNG.sync.read(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), {
      skipRescale: true,
    }) as typeof png;
  } catch (error) {
    throw new UserError(
      `not a readable PNG (${String((error as Error).message ?? error)}); save it again as PNG or PGM`,
      {
        file,
      },
    );
  }
  const { width, height, data } = png;
  const depth = png.depth ?? 8;
  const maxValue = depth === 16 ? 65535 : 255;
  const values = new Float64Array(width * height);
  // Invariant: values[0..i) hold the luminance of the first i pixels (data is RGBA, grey repeated in R, G, B).
  for (let i = 0; i < values.length; i++) {
    const r = data[4 * i];
    const g = data[4 * i + 1];
    const b = data[4 * i + 2];
    values[i] = r === g && g === b ? r : 0.299 * r + 0.587 * g + 0.114 * b;
  }
  return { shape: [height, width], values, maxValue };
}

/** Encodes grey levels as a grayscale PNG of 8 or 16 bits (values rounded and clamped). */
export async function formatPng(
  shape: readonly [number, number],
  values: ArrayLike<number>,
  bitDepth: 8 | 16 = 8,
): Promise<Uint8Array> {
  const { PNG } = (await import('pngjs')).default;
  const [height, width] = shape;
  const max = bitDepth === 16 ? 65535 : 255;
  const raster = bitDepth === 16 ? new Uint16Array(width * height) : new Uint8Array(width * height);
  for (let i = 0; i < raster.length; i++) raster[i] = Math.min(max, Math.max(0, Math.round(values[i])));
  const png = new PNG({ width, height, colorType: 0, inputColorType: 0, bitDepth, inputHasAlpha: false });
  png.data = Buffer.from(raster.buffer, raster.byteOffset, raster.byteLength);
  return new Uint8Array(
    PNG.sync.write(png, { colorType: 0, inputColorType: 0, bitDepth, inputHasAlpha: false }),
  );
}
