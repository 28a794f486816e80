/** Typed-array columns that grow: a longer copy of a column, the same kind of array. */

type Column = Uint32Array | Int32Array | Uint8Array | Float64Array;

/** A copy of `a` with room for `length` entries (its entries first, zeros after). */
export function grownColumn<T extends Column>(a: T, length: number): T {
  const b = new (a.constructor as new (n: number) => T)(length);
  b.set(a);
  return b;
}
