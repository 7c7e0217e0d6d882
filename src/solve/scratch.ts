// Reusable scratch memory for the solver's typed arrays. Creating a typed array of a few KB
// costs more than a whole Newton iteration on a 30-node circuit, so each solve borrows views of
// buffers kept here (grown to the largest circuit seen) instead of allocating its own. A solve
// is synchronous and never re-entered, nothing it returns refers to these buffers, and every
// view is initialised before it is read — so results do not depend on what a previous solve
// left behind (re-solves stay bit-identical). Worker threads each get their own module copy.

interface Slot<T> {
  buf: T;
  /** The last view handed out (views of one length are interchangeable, so it is handed out again). */
  view: T;
}

const float64 = new Map<string, Slot<Float64Array>>();
const int32 = new Map<string, Slot<Int32Array>>();
const uint8 = new Map<string, Slot<Uint8Array>>();

function borrow<T extends Float64Array | Int32Array | Uint8Array>(pool: Map<string, Slot<T>>, make: (n: number) => T, slot: string, length: number): T {
  let s = pool.get(slot);
  if (s !== undefined && s.view.length === length) return s.view;
  if (s === undefined || s.buf.length < length) {
    // Grow with headroom so a run over circuits of rising size does not reallocate each time.
    const buf = make(Math.max(length, Math.ceil((s?.buf.length ?? 0) * 1.5)));
    s = { buf, view: buf };
    pool.set(slot, s);
  }
  s.view = s.buf.subarray(0, length) as T;
  return s.view;
}

/** A Float64Array view of `length` from the named slot; contents are unspecified (initialise before reading). */
export function scratchFloat64(slot: string, length: number): Float64Array {
  return borrow(float64, (n) => new Float64Array(n), slot, length);
}

export function scratchInt32(slot: string, length: number): Int32Array {
  return borrow(int32, (n) => new Int32Array(n), slot, length);
}

export function scratchUint8(slot: string, length: number): Uint8Array {
  return borrow(uint8, (n) => new Uint8Array(n), slot, length);
}
