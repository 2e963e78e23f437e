import { UserError } from '../core/errors.js';

/** A typed array stored inside JSON: exact (no decimal rounding) and about half the size of a number list. */
export interface EncodedArray {
  dtype: 'float64' | 'int32';
  length: number;
  base64: string;
}

export function encodeFloat64(values: Float64Array): EncodedArray {
  return {
    dtype: 'float64',
    length: values.length,
    base64: Buffer.from(values.buffer, values.byteOffset, values.byteLength).toString('base64'),
  };
}

export function encodeInt32(values: Int32Array): EncodedArray {
  return {
    dtype: 'int32',
    length: values.length,
    base64: Buffer.from(values.buffer, values.byteOffset, values.byteLength).toString('base64'),
  };
}

function decode(value: unknown, dtype: EncodedArray['dtype'], what: string): Buffer {
  const v = value as Partial<EncodedArray> | null;
  if (!v || v.dtype !== dtype || typeof v.base64 !== 'string' || typeof v.length !== 'number') {
    throw new UserError(
      `saved model is damaged: ${what} is not a stored ${dtype} array; save the model again`,
    );
  }
  const bytes = Buffer.from(v.base64, 'base64');
  const width = dtype === 'float64' ? 8 : 4;
  if (bytes.length !== v.length * width)
    throw new UserError(
      `saved model is damaged: ${what} holds ${bytes.length} bytes, expected ${v.length * width}; save the model again`,
    );
  return bytes;
}

export function decodeFloat64(value: unknown, what: string): Float64Array {
  const bytes = decode(value, 'float64', what);
  const out = new Float64Array(bytes.length / 8);
  new Uint8Array(out.buffer).set(bytes);
  return out;
}

export function decodeInt32(value: unknown, what: string): Int32Array {
  const bytes = decode(value, 'int32', what);
  const out = new Int32Array(bytes.length / 4);
  new Uint8Array(out.buffer).set(bytes);
  return out;
}
