import { readFileSync, statSync } from 'node:fs';
import { UserError } from '../core/errors.js';
import { writeFileAtomic } from './atomic.js';
import { shown } from './csv.js';

/**
 * NumPy `.npy` arrays, read and written by us (format spec: "NEP 1 — A simple file format for NumPy arrays",
 * Kern, 2007, and numpy/lib/format.py). Written files are version 1.0, little-endian float64, C order:
 *
 *   bytes 0–5  magic  \x93NUMPY
 *   bytes 6–7  version 1, 0
 *   bytes 8–9  header length, little-endian uint16
 *   header     `{'descr': '<f8', 'fortran_order': False, 'shape': (…), }` padded with spaces and ended by `\n`
 *              so that magic + version + length + header is a multiple of 64 bytes
 *   data       the values, 8 bytes each
 *
 * The reader accepts versions 1–3, float/int/uint/bool of any standard width and either byte order, and
 * Fortran order (transposed back to C order); every value is returned as a float64.
 */
export interface NpyArray {
  shape: number[];
  /** Row-major (C order) values. */
  data: Float64Array;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];
const ALIGN = 64;

/** The header dictionary text numpy writes for a float64 C-order array of `shape`. */
export function npyHeaderText(shape: readonly number[]): string {
  const tuple = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  return `{'descr': '<f8', 'fortran_order': False, 'shape': ${tuple}, }`;
}

/** The bytes of a version 1.0 `.npy` file holding `data` (row-major) with `shape`, as float64 little-endian. */
export function formatNpy(shape: readonly number[], data: ArrayLike<number>): Uint8Array {
  let count = 1;
  for (const n of shape) {
    if (!Number.isInteger(n) || n < 0)
      throw new Error(`formatNpy: bad dimension ${n} in shape [${shape.join(', ')}]`);
    count *= n;
  }
  if (count !== data.length)
    throw new Error(`formatNpy: shape [${shape.join(', ')}] holds ${count} values, data has ${data.length}`);
  const dict = npyHeaderText(shape);
  // 10 bytes of preamble for version 1.0 (magic 6, version 2, length 2); 12 for version 2.0 (length 4).
  let preamble = 10;
  let total = Math.ceil((preamble + dict.length + 1) / ALIGN) * ALIGN;
  if (total - preamble > 0xffff) {
    preamble = 12;
    total = Math.ceil((preamble + dict.length + 1) / ALIGN) * ALIGN;
  }
  const headerLength = total - preamble;
  const out = new Uint8Array(total + count * 8);
  out.set(MAGIC, 0);
  out[6] = preamble === 10 ? 1 : 2;
  out[7] = 0;
  const view = new DataView(out.buffer);
  if (preamble === 10) view.setUint16(8, headerLength, true);
  else view.setUint32(8, headerLength, true);
  let p = preamble;
  for (let i = 0; i < dict.length; i++) out[p++] = dict.charCodeAt(i);
  while (p < total - 1) out[p++] = 0x20;
  out[total - 1] = 0x0a;
  // Invariant: bytes [total, total + 8i) hold data[0..i) as little-endian float64.
  for (let i = 0; i < count; i++) view.setFloat64(total + 8 * i, data[i], true);
  return out;
}

/** Writes a float64 `.npy` atomically. */
export function writeNpy(path: string, shape: readonly number[], data: ArrayLike<number>): void {
  writeFileAtomic(path, formatNpy(shape, data));
}

interface Dtype {
  littleEndian: boolean;
  kind: 'f' | 'i' | 'u' | 'b';
  size: number;
}

function parseDescr(descr: string, file: string): Dtype {
  const m = /^([<>|=]?)([fiub])(\d+)$/.exec(descr);
  const fail = (): never => {
    throw new UserError(
      `unsupported .npy data type '${shown(descr)}'; save the array as float64 (numpy: a.astype('<f8'))`,
      { file },
    );
  };
  if (!m) return fail();
  const kind = m[2] as Dtype['kind'];
  const size = Number(m[3]);
  const ok =
    kind === 'f' ? size === 4 || size === 8 : kind === 'b' ? size === 1 : [1, 2, 4, 8].includes(size);
  if (!ok) return fail();
  return { littleEndian: m[1] !== '>', kind, size };
}

/**
 * Parses the bytes of a `.npy` file; a malformed file is the user's one-line error naming `file`. For C-order
 * little-endian float64 the returned data is a view on `bytes` (no copy); copy it before changing `bytes`.
 */
export function parseNpy(bytes: Uint8Array, file: string): NpyArray {
  if (bytes.length < 10 || MAGIC.some((b, i) => bytes[i] !== b)) {
    throw new UserError('not a .npy file (the magic bytes \\x93NUMPY are missing); save it with numpy.save', {
      file,
    });
  }
  const major = bytes[6];
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let headerLength: number;
  let start: number;
  if (major === 1) {
    headerLength = view.getUint16(8, true);
    start = 10;
  } else if (major === 2 || major === 3) {
    if (bytes.length < 12) throw new UserError('truncated .npy header; write the file again', { file });
    headerLength = view.getUint32(8, true);
    start = 12;
  } else {
    throw new UserError(`unsupported .npy version ${major}.${bytes[7]}; save with numpy.save`, { file });
  }
  if (start + headerLength > bytes.length)
    throw new UserError('truncated .npy header; write the file again', { file });
  const header = new TextDecoder(major === 3 ? 'utf-8' : 'latin1').decode(
    bytes.subarray(start, start + headerLength),
  );
  const descr = /'descr'\s*:\s*'([^']*)'/.exec(header)?.[1];
  const fortran = /'fortran_order'\s*:\s*(True|False)/.exec(header)?.[1];
  const shapeText = /'shape'\s*:\s*\(([^)]*)\)/.exec(header)?.[1];
  if (descr === undefined || fortran === undefined || shapeText === undefined) {
    throw new UserError(
      'the .npy header lacks descr, fortran_order or shape; save the plain array with numpy.save',
      {
        file,
      },
    );
  }
  const dtype = parseDescr(descr, file);
  const shape = shapeText
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '')
    .map((s) => {
      const n = Number(s.replace(/L$/, ''));
      if (!Number.isInteger(n) || n < 0)
        throw new UserError(`bad .npy shape (${shapeText}); save the array again`, { file });
      return n;
    });
  const count = shape.reduce((a, b) => a * b, 1);
  const offset = start + headerLength;
  const need = count * dtype.size;
  if (bytes.length - offset < need) {
    throw new UserError(
      `truncated .npy data: shape (${shape.join(', ')}) needs ${need} bytes, the file has ${bytes.length - offset}`,
      { file },
    );
  }
  if (bytes.length - offset > need) {
    // numpy.save writes exactly the data of the shape; more means a wrong header or two arrays in one file.
    throw new UserError(
      `the .npy data is longer than its shape: (${shape.join(', ')}) needs ${need} bytes, the file has ${bytes.length - offset}; save the array again with numpy.save`,
      { file },
    );
  }
  // Little-endian float64 at an 8-byte-aligned address (the header pads to 64 bytes) is used in place, without
  // a copy: the result then shares memory with `bytes`. Anything else is converted value by value.
  const start8 = bytes.byteOffset + offset;
  const inPlace =
    dtype.kind === 'f' && dtype.size === 8 && dtype.littleEndian && start8 % 8 === 0 && littleEndianHost();
  const raw = inPlace ? new Float64Array(bytes.buffer, start8, count) : new Float64Array(count);
  if (!inPlace) readValues(view, offset, dtype, raw);
  for (let i = 0; i < count; i++) {
    if (!Number.isFinite(raw[i])) {
      throw new UserError(`value ${i} (flat index) is ${raw[i]}; every value must be a finite number`, {
        file,
      });
    }
  }
  const data = fortran === 'True' && shape.length > 1 ? fortranToC(raw, shape) : raw;
  return { shape, data };
}

function readValues(view: DataView, offset: number, t: Dtype, out: Float64Array): void {
  const le = t.littleEndian;
  const n = out.length;
  // Invariant: out[0..i) holds the first i values converted to float64.
  if (t.kind === 'f' && t.size === 8)
    for (let i = 0; i < n; i++) out[i] = view.getFloat64(offset + 8 * i, le);
  else if (t.kind === 'f') for (let i = 0; i < n; i++) out[i] = view.getFloat32(offset + 4 * i, le);
  else if (t.kind === 'b' || (t.kind === 'u' && t.size === 1))
    for (let i = 0; i < n; i++) out[i] = view.getUint8(offset + i);
  else if (t.kind === 'i' && t.size === 1) for (let i = 0; i < n; i++) out[i] = view.getInt8(offset + i);
  else if (t.kind === 'u' && t.size === 2)
    for (let i = 0; i < n; i++) out[i] = view.getUint16(offset + 2 * i, le);
  else if (t.kind === 'i' && t.size === 2)
    for (let i = 0; i < n; i++) out[i] = view.getInt16(offset + 2 * i, le);
  else if (t.kind === 'u' && t.size === 4)
    for (let i = 0; i < n; i++) out[i] = view.getUint32(offset + 4 * i, le);
  else if (t.kind === 'i' && t.size === 4)
    for (let i = 0; i < n; i++) out[i] = view.getInt32(offset + 4 * i, le);
  else if (t.kind === 'u') for (let i = 0; i < n; i++) out[i] = Number(view.getBigUint64(offset + 8 * i, le));
  else for (let i = 0; i < n; i++) out[i] = Number(view.getBigInt64(offset + 8 * i, le));
}

function littleEndianHost(): boolean {
  return new Uint8Array(Float64Array.of(1).buffer)[7] === 0x3f;
}

/** Reorders a Fortran-order (first index fastest) array into C order (last index fastest). */
function fortranToC(data: Float64Array, shape: readonly number[]): Float64Array {
  const out = new Float64Array(data.length);
  const rank = shape.length;
  const index = new Int32Array(rank);
  const fStride = new Float64Array(rank);
  fStride[0] = 1;
  for (let k = 1; k < rank; k++) fStride[k] = fStride[k - 1] * shape[k - 1];
  // Invariant: index is the multi-index of C-order position c; out[0..c) is filled.
  for (let c = 0; c < data.length; c++) {
    let f = 0;
    for (let k = 0; k < rank; k++) f += index[k] * fStride[k];
    out[c] = data[f];
    for (let k = rank - 1; k >= 0; k--) {
      if (++index[k] < shape[k]) break;
      index[k] = 0;
    }
  }
  return out;
}

/** Reads a `.npy` file. */
export function readNpy(file: string): NpyArray {
  let ok = false;
  try {
    ok = statSync(file).isFile();
  } catch {
    throw new UserError('file not found; check the path', { file });
  }
  if (!ok) throw new UserError('is a folder, not a .npy file; give a file', { file });
  return parseNpy(readFileSync(file), file);
}
