import Papa from 'papaparse';
import type { DatasetColumn } from '@/models/Dataset';

/** Parse the (known-good) demo CSV into the stored table shape. */
export function parseDemoTable(csv: string): { columns: DatasetColumn[]; cells: (number | string | null)[][] } {
  const parsed = Papa.parse<string[]>(csv.trim(), { skipEmptyLines: true });
  const [header, ...rows] = parsed.data;
  const columns: DatasetColumn[] = header.map((name, j) => {
    const values = rows.map((r) => Number(r[j])).filter((v) => Number.isFinite(v));
    const numeric = values.length === rows.length;
    const mean = numeric ? values.reduce((a, b) => a + b, 0) / values.length : null;
    const std = numeric && mean !== null ? Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / Math.max(1, values.length - 1)) : null;
    return {
      name,
      kind: numeric ? 'numeric' : 'text',
      count: rows.length,
      missing: 0,
      min: numeric ? Math.min(...values) : null,
      max: numeric ? Math.max(...values) : null,
      mean,
      std,
    };
  });
  const cells = rows.map((r) => r.map((cell, j) => (columns[j].kind === 'numeric' ? Number(cell) : cell)));
  return { columns, cells };
}
