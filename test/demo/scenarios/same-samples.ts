/** Same ids, labels and bit-identical values (faster than a deep comparison of typed arrays). */
export function sameSamples<T extends { id: string; label: string }>(x: T[], y: T[]): boolean {
  const bytes = (s: T): Buffer => {
    const r = s as unknown as { coords?: Float64Array; values?: Float64Array };
    const a = (r.coords ?? r.values) as Float64Array;
    return Buffer.from(a.buffer, a.byteOffset, a.byteLength);
  };
  return (
    x.length === y.length &&
    x.every((s, i) => s.id === y[i].id && s.label === y[i].label && bytes(s).equals(bytes(y[i])))
  );
}
