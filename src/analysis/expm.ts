/**
 * Dense real matrices as row-major Float64Array (entry (i, j) at i * n + j), and the
 * matrix exponential by scaling and squaring with a diagonal [6/6] Pade approximant.
 *
 * Why [6/6] after scaling to a 1-norm of at most 1/2: the truncation error of the
 * diagonal [q/q] approximant is about (q!)^2 / ((2q)! (2q+1)!) ||A||^(2q+1), which for
 * q = 6 and ||A|| = 1/2 is ~2e-17, below double precision, while costing only three
 * products and one LU solve. The step simulator calls this a handful of times per loop
 * on matrices of order ~10, so simplicity beats the last factor of speed.
 */

/** C = A B for n x n matrices (C must not alias A or B). */
export function matMul(a: Float64Array, b: Float64Array, n: number, out: Float64Array = new Float64Array(n * n)): Float64Array {
  out.fill(0);
  for (let i = 0; i < n; i++) {
    const io = i * n;
    for (let k = 0; k < n; k++) {
      const aik = a[io + k]!;
      if (aik === 0) continue;
      const ko = k * n;
      for (let j = 0; j < n; j++) out[io + j] += aik * b[ko + j]!;
    }
  }
  return out;
}

/** Largest absolute column sum (the matrix 1-norm). */
export function matNorm1(a: Float64Array, n: number): number {
  let best = 0;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.abs(a[i * n + j]!);
    if (s > best) best = s;
  }
  return best;
}

/** Solves D X = N in place of N (both n x n) by LU with partial pivoting; D is overwritten. */
function solveInPlace(d: Float64Array, nm: Float64Array, n: number): void {
  for (let c = 0; c < n; c++) {
    let p = c;
    let best = Math.abs(d[c * n + c]!);
    for (let r = c + 1; r < n; r++) {
      const v = Math.abs(d[r * n + c]!);
      if (v > best) { best = v; p = r; }
    }
    if (best === 0) throw new Error('expm: singular Pade denominator');
    if (p !== c) {
      for (let j = 0; j < n; j++) {
        const t = d[c * n + j]!; d[c * n + j] = d[p * n + j]!; d[p * n + j] = t;
        const u = nm[c * n + j]!; nm[c * n + j] = nm[p * n + j]!; nm[p * n + j] = u;
      }
    }
    const piv = d[c * n + c]!;
    for (let r = c + 1; r < n; r++) {
      const f = d[r * n + c]! / piv;
      if (f === 0) continue;
      for (let j = c; j < n; j++) d[r * n + j] -= f * d[c * n + j]!;
      for (let j = 0; j < n; j++) nm[r * n + j] -= f * nm[c * n + j]!;
    }
  }
  for (let c = n - 1; c >= 0; c--) {
    const piv = d[c * n + c]!;
    for (let j = 0; j < n; j++) {
      let s = nm[c * n + j]!;
      for (let k = c + 1; k < n; k++) s -= d[c * n + k]! * nm[k * n + j]!;
      nm[c * n + j] = s / piv;
    }
  }
}

// Coefficients of the diagonal [6/6] Pade approximant of exp: c_k = (12-k)! 6! / (12! k! (6-k)!).
const PADE6 = [1, 1 / 2, 5 / 44, 1 / 66, 1 / 792, 1 / 15840, 1 / 665280];

/** e^A for an n x n matrix A (row-major), by scaling and squaring with [6/6] Pade. */
export function expm(a: Float64Array, n: number): Float64Array {
  if (n === 0) return new Float64Array(0);
  const norm = matNorm1(a, n);
  if (!Number.isFinite(norm)) throw new Error('expm: non-finite matrix');
  const squarings = norm > 0.5 ? Math.ceil(Math.log2(norm / 0.5)) : 0;
  const scale = 2 ** -squarings;
  const x = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) x[i] = a[i]! * scale;
  const x2 = matMul(x, x, n);
  const x4 = matMul(x2, x2, n);
  const x6 = matMul(x4, x2, n);
  const even = new Float64Array(n * n);
  const oddInner = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    even[i] = PADE6[2]! * x2[i]! + PADE6[4]! * x4[i]! + PADE6[6]! * x6[i]!;
    oddInner[i] = PADE6[3]! * x2[i]! + PADE6[5]! * x4[i]!;
  }
  for (let i = 0; i < n; i++) {
    even[i * n + i] += PADE6[0]!;
    oddInner[i * n + i] += PADE6[1]!;
  }
  const odd = matMul(x, oddInner, n);
  const num = new Float64Array(n * n);
  const den = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    num[i] = even[i]! + odd[i]!;
    den[i] = even[i]! - odd[i]!;
  }
  solveInPlace(den, num, n);
  let r = num;
  let tmp = new Float64Array(n * n);
  for (let s = 0; s < squarings; s++) {
    matMul(r, r, n, tmp);
    const t = r; r = tmp; tmp = t;
  }
  return r;
}
