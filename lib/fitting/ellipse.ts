/**
 * Contours of a 2-D Gaussian: the points at Mahalanobis distance r from the mean,
 * from the 2×2 covariance sub-matrix of two features. r = 1 and r = 2 are the "1-sigma"
 * and "2-sigma" ellipses drawn over the scatter.
 */
export function ellipsePath(mean: [number, number], cov: [[number, number], [number, number]], r: number, steps = 72): [number, number][] {
  const a = cov[0][0];
  const b = cov[0][1];
  const c = cov[1][1];
  // Eigen-decomposition of the symmetric 2×2 matrix [[a, b], [b, c]].
  const half = (a + c) / 2;
  const disc = Math.sqrt(Math.max(0, ((a - c) / 2) ** 2 + b * b));
  const l1 = Math.max(0, half + disc);
  const l2 = Math.max(0, half - disc);
  const angle = b === 0 && a >= c ? 0 : b === 0 ? Math.PI / 2 : Math.atan2(l1 - a, b);
  const cos = Math.cos(angle);
  const sin = Math.sin(angle);
  const s1 = r * Math.sqrt(l1);
  const s2 = r * Math.sqrt(l2);
  const out: [number, number][] = [];
  for (let i = 0; i <= steps; i++) {
    const t = (2 * Math.PI * i) / steps;
    const u = s1 * Math.cos(t);
    const v = s2 * Math.sin(t);
    out.push([mean[0] + u * cos - v * sin, mean[1] + u * sin + v * cos]);
  }
  return out;
}
