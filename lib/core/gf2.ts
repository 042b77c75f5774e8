import { type Bits, packBits, popcount32 } from "./bits";
import type { Word } from "./codes/types";
import { InputError } from "./errors";

/*
 * Matrices over GF(2) as lists of rows, each row a Bits word (0/1 per entry). Internally rows are
 * packed 32 entries to a Uint32Array word (entry j at word j >>> 5, bit j & 31, as packBits does)
 * so that a row operation is a word-wise XOR.
 */

function unpack(words: Uint32Array, n: number): Bits {
  const out = new Uint8Array(n);
  for (let j = 0; j < n; j++) out[j] = (words[j >>> 5]! >>> (j & 31)) & 1;
  return out;
}

function bitAt(words: Uint32Array, j: number): number {
  return (words[j >>> 5]! >>> (j & 31)) & 1;
}

function xorInto(target: Uint32Array, source: Uint32Array): void {
  for (let w = 0; w < target.length; w++) target[w]! ^= source[w]!;
}

function isZero(words: Uint32Array): boolean {
  for (let w = 0; w < words.length; w++) if (words[w] !== 0) return false;
  return true;
}

/** Column count of a matrix after checking every row has it and holds only 0 and 1; `n` is required when there are no rows. */
function columns(rows: readonly Bits[], field: string, n?: number): number {
  const cols = n ?? rows[0]?.length;
  if (cols === undefined) throw new InputError(`${field} has no rows, so its number of columns is unknown`, [field]);
  rows.forEach((row, i) => {
    if (row.length !== cols) throw new InputError(`${field} row ${i} has ${row.length} entries but the matrix has ${cols} columns; all rows need the same length`, [field, i]);
    for (let j = 0; j < cols; j++) {
      const v = row[j]!;
      if (v !== 0 && v !== 1) throw new InputError(`${field} row ${i}, column ${j} is ${v}; entries are 0 or 1`, [field, i, j]);
    }
  });
  return cols;
}

/** Checks a matrix is non-empty, rectangular and binary, and returns its number of columns. */
export function checkMatrix(rows: readonly Bits[], field: string): number {
  if (rows.length === 0) throw new InputError(`${field} is empty; give at least one row`, [field]);
  const n = columns(rows, field);
  if (n === 0) throw new InputError(`${field} rows are empty; give at least one column`, [field, 0]);
  return n;
}

/**
 * The first row that is a sum of earlier rows, and which earlier rows sum to it, or undefined when
 * the rows are linearly independent: Gaussian elimination that tracks each reduced row's combination
 * (MacWilliams & Sloane 1977, ch. 1, from memory).
 */
export function dependentRow(rows: readonly Bits[]): { row: number; sumOf: number[] } | undefined {
  if (rows.length === 0) return undefined;
  columns(rows, "rows");
  const k = rows.length;
  const basis: { vec: Uint32Array; combo: Uint32Array; pivot: number }[] = [];
  for (let i = 0; i < k; i++) {
    const vec = packBits(rows[i]!);
    const combo = new Uint32Array((k + 31) >>> 5);
    combo[i >>> 5]! |= 1 << (i & 31);
    // Each basis row is zero at the earlier pivots, so one pass in insertion order clears every pivot of vec.
    for (const b of basis) {
      if (bitAt(vec, b.pivot)) {
        xorInto(vec, b.vec);
        xorInto(combo, b.combo);
      }
    }
    if (isZero(vec)) {
      const sumOf: number[] = [];
      for (let j = 0; j < i; j++) if (bitAt(combo, j)) sumOf.push(j);
      return { row: i, sumOf };
    }
    let pivot = 0;
    while (!bitAt(vec, pivot)) pivot++;
    basis.push({ vec, combo, pivot });
  }
  return undefined;
}

/** Throws InputError naming the first row that is a sum of earlier rows (a code's generator or parity-check rows must be independent). */
export function checkFullRank(rows: readonly Bits[], field: string): void {
  const dep = dependentRow(rows);
  if (!dep) return;
  const what = dep.sumOf.length === 0 ? "is all zero" : `is the sum of row${dep.sumOf.length > 1 ? "s" : ""} ${dep.sumOf.join(" + ")}`;
  throw new InputError(`${field} rows are linearly dependent: row ${dep.row} ${what}`, [field, dep.row]);
}

/** Gauss–Jordan elimination on packed rows in place; returns the pivot column of each of the first `rank` rows. */
function eliminate(packed: Uint32Array[], n: number): number[] {
  const pivots: number[] = [];
  let r = 0;
  for (let col = 0; col < n && r < packed.length; col++) {
    let p = r;
    while (p < packed.length && !bitAt(packed[p]!, col)) p++;
    if (p === packed.length) continue;
    [packed[r], packed[p]] = [packed[p]!, packed[r]!];
    const pivotRow = packed[r]!;
    for (let i = 0; i < packed.length; i++) if (i !== r && bitAt(packed[i]!, col)) xorInto(packed[i]!, pivotRow);
    pivots.push(col);
    r++;
  }
  return pivots;
}

/** Reduced row echelon form by Gauss–Jordan elimination, zero rows dropped, with each row's pivot column (Lin & Costello 2004, ch. 3, from memory). */
export function rref(rows: readonly Bits[]): { rows: Bits[]; pivots: number[] } {
  if (rows.length === 0) return { rows: [], pivots: [] };
  const n = columns(rows, "rows");
  const packed = rows.map(packBits);
  const pivots = eliminate(packed, n);
  return { rows: packed.slice(0, pivots.length).map((w) => unpack(w, n)), pivots };
}

/** Rank over GF(2): the number of non-zero rows of the reduced row echelon form (Lin & Costello 2004, ch. 3, from memory). */
export function rank(rows: readonly Bits[]): number {
  return rref(rows).pivots.length;
}

/** Column j of the result is column permutation[j] of the input. */
export function permuteColumns(rows: readonly Bits[], permutation: readonly number[]): Bits[] {
  return rows.map((row) => Uint8Array.from(permutation, (c) => row[c]!));
}

/**
 * Systematic form [I_k | P] of full-rank rows: the reduced row echelon form with its pivot columns
 * moved to the front in order and the other columns after them in order; `permutation[j]` is the
 * original column now at position j (the identity when the pivots are already columns 0..k−1)
 * (MacWilliams & Sloane 1977, ch. 1, from memory).
 */
export function systematicForm(rows: readonly Bits[], field = "rows"): { rows: Bits[]; permutation: number[] } {
  const n = checkMatrix(rows, field);
  checkFullRank(rows, field);
  const { rows: reduced, pivots } = rref(rows);
  const isPivot = new Uint8Array(n);
  for (const p of pivots) isPivot[p] = 1;
  const permutation = [...pivots];
  for (let j = 0; j < n; j++) if (!isPivot[j]) permutation.push(j);
  return { rows: permuteColumns(reduced, permutation), permutation };
}

/**
 * Basis of the null space {x : M·xᵀ = 0}: one vector per non-pivot column f of the reduced row echelon
 * form, with x_f = 1 and x at each pivot column equal to that row's entry in column f. For M = [I | P]
 * this is [Pᵀ | I] (Lin & Costello 2004, ch. 3, from memory).
 */
export function nullSpace(rows: readonly Bits[], n?: number): Bits[] {
  const cols = columns(rows, "rows", n);
  const { rows: reduced, pivots } = rref(rows);
  const isPivot = new Uint8Array(cols);
  for (const p of pivots) isPivot[p] = 1;
  const basis: Bits[] = [];
  for (let f = 0; f < cols; f++) {
    if (isPivot[f]) continue;
    const x = new Uint8Array(cols);
    x[f] = 1;
    reduced.forEach((row, i) => (x[pivots[i]!] = row[f]!));
    basis.push(x);
  }
  return basis;
}

/** Parity-check matrix H ((n − k) × n, full rank) of a full-rank generator G with H·Gᵀ = 0: the null space of G, [Pᵀ | I] when G = [I | P] (MacWilliams & Sloane 1977, ch. 1). */
export function parityCheckFromGenerator(generator: readonly Bits[]): Bits[] {
  checkMatrix(generator, "generator");
  checkFullRank(generator, "generator");
  return nullSpace(generator);
}

/** Generator G (k × n, full rank) of the code with full-rank parity-check matrix H, so H·Gᵀ = 0: the null space of H (MacWilliams & Sloane 1977, ch. 1). */
export function generatorFromParityCheck(parityCheck: readonly Bits[]): Bits[] {
  checkMatrix(parityCheck, "parityCheck");
  checkFullRank(parityCheck, "parityCheck");
  return nullSpace(parityCheck);
}

/** Row vector times matrix over GF(2): v·M = ⊕_{i: v_i = 1} M_i (Lin & Costello 2004, ch. 3). `n` is needed when M has no rows. */
export function vecMatMul(v: Bits, rows: readonly Bits[], n?: number): Bits {
  const cols = columns(rows, "rows", n);
  if (v.length !== rows.length) throw new InputError(`the vector has ${v.length} entries but the matrix has ${rows.length} rows`, ["vector"]);
  const acc = new Uint32Array((cols + 31) >>> 5);
  for (let i = 0; i < v.length; i++) if (v[i]) xorInto(acc, packBits(rows[i]!));
  return unpack(acc, cols);
}

/** Syndrome s = H·rᵀ over GF(2): s_i is the parity of row i of H against r (Lin & Costello 2004, ch. 3). */
export function syndrome(parityCheck: readonly Bits[], received: Bits): Bits {
  columns(parityCheck, "parityCheck", received.length);
  const r = packBits(received);
  return Uint8Array.from(parityCheck, (row) => {
    const h = packBits(row);
    let x = 0;
    for (let w = 0; w < h.length; w++) x ^= h[w]! & r[w]!;
    return popcount32(x) & 1;
  });
}

/** Checks a word is a 0/1 Uint8Array of the given length; `field` names it in the error ("message", "received"). */
export function checkBinaryWord(word: Word, length: number, field: string, codeName: string): Bits {
  if (!(word instanceof Uint8Array)) throw new InputError(`${field} must be bits (0/1); ${codeName} is a binary code`, [field]);
  if (word.length !== length) throw new InputError(`${field} has ${word.length} bits; ${codeName} takes ${length}`, [field]);
  for (let i = 0; i < length; i++) {
    const v = word[i]!;
    if (v !== 0 && v !== 1) throw new InputError(`${field} bit ${i} is ${v}; bits are 0 or 1`, [field, i]);
  }
  return word;
}

/** Throws InputError when erasures are given to a decoder that does not take them. */
export function rejectErasures(erasures: readonly number[] | undefined, codeName: string): void {
  if (erasures && erasures.length > 0) throw new InputError(`${codeName} decoding does not take erasures`, ["erasures"]);
}
