/** Numbers for tables: enough digits to compare, not so many that columns wobble. */
export function num(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  const abs = Math.abs(v);
  if (abs !== 0 && (abs >= 1e6 || abs < 1e-3)) return v.toExponential(2);
  const decimals = abs >= 1000 ? 0 : abs >= 100 ? 1 : abs >= 10 ? Math.min(digits, 2) : digits;
  return v.toLocaleString('en', { minimumFractionDigits: 0, maximumFractionDigits: decimals });
}

export function pct(v: number | null | undefined, digits = 0): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return `${(v * 100).toFixed(digits)}%`;
}

export function count(v: number): string {
  return v.toLocaleString('en');
}

export const STRUCTURE_LABEL: Record<string, string> = {
  full: 'full',
  diagonal: 'diagonal',
  spherical: 'spherical',
  tied: 'tied',
};

export const STRUCTURE_HELP: Record<string, string> = {
  full: 'each cluster has its own shape and tilt',
  diagonal: 'own spread per feature, no tilt',
  spherical: 'one spread per cluster, round',
  tied: 'all clusters share one shape',
};
