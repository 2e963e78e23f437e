/**
 * A dense row-major matrix of float64: the one shape in which samples × features move between the
 * vectoriser, scaler, PCA and classifiers.
 */
export interface Matrix {
  rows: number;
  cols: number;
  /** Row-major values, length rows × cols. */
  data: Float64Array;
}

export function zeros(rows: number, cols: number): Matrix {
  return { rows, cols, data: new Float64Array(rows * cols) };
}

export function fromRows(rowsIn: ArrayLike<ArrayLike<number>>, cols?: number): Matrix {
  const rows = rowsIn.length;
  const c = cols ?? (rows > 0 ? rowsIn[0].length : 0);
  const data = new Float64Array(rows * c);
  for (let i = 0; i < rows; i++) {
    const r = rowsIn[i];
    for (let j = 0; j < c; j++) data[i * c + j] = r[j];
  }
  return { rows, cols: c, data };
}

export function row(m: Matrix, i: number): Float64Array {
  return m.data.subarray(i * m.cols, (i + 1) * m.cols);
}

/** The rows at `indices`, copied, in that order. */
export function takeRows(m: Matrix, indices: ArrayLike<number>): Matrix {
  const out = new Float64Array(indices.length * m.cols);
  for (let k = 0; k < indices.length; k++) out.set(row(m, indices[k]), k * m.cols);
  return { rows: indices.length, cols: m.cols, data: out };
}

/** Columns of `a` then columns of `b`, row by row. */
export function concatColumns(a: Matrix, b: Matrix): Matrix {
  if (a.rows !== b.rows) throw new Error(`concatColumns: ${a.rows} rows vs ${b.rows}`);
  const cols = a.cols + b.cols;
  const data = new Float64Array(a.rows * cols);
  for (let i = 0; i < a.rows; i++) {
    data.set(row(a, i), i * cols);
    data.set(row(b, i), i * cols + a.cols);
  }
  return { rows: a.rows, cols, data };
}
