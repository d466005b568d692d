/**
 * Eigenvalues of a real upper Hessenberg matrix by the Francis double-shift QR
 * iteration (Golub & Van Loan, Matrix Computations, 4th ed., section 7.5; the
 * deflation tests, exceptional shifts at iterations 10 and 20 and the bulge
 * start as in the classic eigenvalue-only routine of Numerical Recipes, 2nd ed.,
 * section 11.6; both from memory). Only the active block is updated: no Schur vectors are
 * accumulated, which is most of the work a general eigen solver does. A
 * companion matrix is already Hessenberg, so polynomial roots need nothing else.
 */

/** Eigenvalues of an upper Hessenberg matrix (row-major, n x n, overwritten); null when an eigenvalue takes more than 60 iterations. */
export function hessenbergEigenvalues(h: Float64Array, n: number): { re: Float64Array; im: Float64Array } | null {
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const at = (i: number, j: number) => i * n + j;
  let norm = 0;
  for (let i = 0; i < n; i++) for (let j = Math.max(i - 1, 0); j < n; j++) norm += Math.abs(h[at(i, j)]!);
  let hi = n - 1;
  let shift = 0;
  let its = 0;
  while (hi >= 0) {
    // Deflate where a subdiagonal entry is negligible next to its diagonal neighbours.
    let l = hi;
    for (; l > 0; l--) {
      let s = Math.abs(h[at(l - 1, l - 1)]!) + Math.abs(h[at(l, l)]!);
      if (s === 0) s = norm;
      if (Math.abs(h[at(l, l - 1)]!) + s === s) {
        h[at(l, l - 1)] = 0;
        break;
      }
    }
    let x = h[at(hi, hi)]!;
    if (l === hi) {
      re[hi] = x + shift;
      im[hi] = 0;
      hi--;
      its = 0;
      continue;
    }
    let y = h[at(hi - 1, hi - 1)]!;
    let w = h[at(hi, hi - 1)]! * h[at(hi - 1, hi)]!;
    if (l === hi - 1) {
      // The trailing 2x2 block: a real pair or a complex conjugate pair.
      const p = 0.5 * (y - x);
      const q = p * p + w;
      const z = Math.sqrt(Math.abs(q));
      x += shift;
      if (q >= 0) {
        const zz = p + (p >= 0 ? z : -z);
        re[hi - 1] = x + zz;
        re[hi] = zz !== 0 ? x - w / zz : x + zz;
        im[hi - 1] = 0;
        im[hi] = 0;
      } else {
        re[hi - 1] = x + p;
        re[hi] = x + p;
        im[hi - 1] = z;
        im[hi] = -z;
      }
      hi -= 2;
      its = 0;
      continue;
    }
    if (its >= 60) return null;
    if (its === 10 || its === 20) {
      // Exceptional shift: breaks the rare cycles of the standard one.
      shift += x;
      for (let i = 0; i <= hi; i++) h[at(i, i)] -= x;
      const s = Math.abs(h[at(hi, hi - 1)]!) + Math.abs(h[at(hi - 1, hi - 2)]!);
      x = 0.75 * s;
      y = x;
      w = -0.4375 * s * s;
    }
    its++;
    // Look for two consecutive small subdiagonal entries, to start the bulge there.
    let m = hi - 2;
    let p = 0, q = 0, r = 0;
    for (; m >= l; m--) {
      const z = h[at(m, m)]!;
      const rr = x - z;
      const ss = y - z;
      p = (rr * ss - w) / h[at(m + 1, m)]! + h[at(m, m + 1)]!;
      q = h[at(m + 1, m + 1)]! - z - rr - ss;
      r = h[at(m + 2, m + 1)]!;
      const s = Math.abs(p) + Math.abs(q) + Math.abs(r);
      p /= s; q /= s; r /= s;
      if (m === l) break;
      const u = Math.abs(h[at(m, m - 1)]!) * (Math.abs(q) + Math.abs(r));
      const v = Math.abs(p) * (Math.abs(h[at(m - 1, m - 1)]!) + Math.abs(z) + Math.abs(h[at(m + 1, m + 1)]!));
      if (u + v === v) break;
    }
    for (let i = m + 2; i <= hi; i++) {
      h[at(i, i - 2)] = 0;
      if (i !== m + 2) h[at(i, i - 3)] = 0;
    }
    // Chase the bulge down with 3x3 Householder reflections, on the active block only (no vectors wanted).
    for (let k = m; k <= hi - 1; k++) {
      let xx = 0;
      if (k !== m) {
        p = h[at(k, k - 1)]!;
        q = h[at(k + 1, k - 1)]!;
        r = k !== hi - 1 ? h[at(k + 2, k - 1)]! : 0;
        xx = Math.abs(p) + Math.abs(q) + Math.abs(r);
        if (xx !== 0) { p /= xx; q /= xx; r /= xx; }
      }
      const norm3 = Math.sqrt(p * p + q * q + r * r);
      const s = p >= 0 ? norm3 : -norm3;
      if (s === 0) continue;
      if (k === m) {
        if (l !== m) h[at(k, k - 1)] = -h[at(k, k - 1)]!;
      } else h[at(k, k - 1)] = -s * xx;
      p += s;
      const hx = p / s;
      const hy = q / s;
      const hz = r / s;
      q /= p;
      r /= p;
      for (let j = k; j <= hi; j++) {
        let t = h[at(k, j)]! + q * h[at(k + 1, j)]!;
        if (k !== hi - 1) {
          t += r * h[at(k + 2, j)]!;
          h[at(k + 2, j)] -= t * hz;
        }
        h[at(k + 1, j)] -= t * hy;
        h[at(k, j)] -= t * hx;
      }
      const top = Math.min(hi, k + 3);
      for (let i = l; i <= top; i++) {
        let t = hx * h[at(i, k)]! + hy * h[at(i, k + 1)]!;
        if (k !== hi - 1) {
          t += hz * h[at(i, k + 2)]!;
          h[at(i, k + 2)] -= t * r;
        }
        h[at(i, k + 1)] -= t * q;
        h[at(i, k)] -= t;
      }
    }
  }
  return { re, im };
}
