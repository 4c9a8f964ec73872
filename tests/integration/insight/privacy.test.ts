import { describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { flushUsage } from '@/lib/usage';
import { InsightCount, sequelize } from '@/models';
import { answer, insightCalculator, liftScoringLimits } from './helpers';

/** Every cell of every table (blobs read as text) in which a needle turns up, as "table.column". */
async function findAnywhere(texts: string[], numbers: number[], addresses: string[]): Promise<string[]> {
  // Every table the dialect knows (SQLite or PostgreSQL), not only the models'.
  const tables = ((await sequelize.getQueryInterface().showAllTables()) as (string | { tableName: string })[]).map((t) => ({ name: typeof t === 'string' ? t : t.tableName }));
  const found: string[] = [];
  const numberSet = new Set(numbers);
  for (const { name } of tables) {
    const rows = await sequelize.query<Record<string, unknown>>(`SELECT * FROM "${name}"`, { type: QueryTypes.SELECT });
    for (const row of rows) {
      for (const [column, value] of Object.entries(row)) {
        if (value === null || value === undefined) continue;
        if (typeof value === 'number') {
          if (numberSet.has(value) || numbers.some((n) => Math.abs(n - value) < 1e-9)) found.push(`${name}.${column} = ${value}`);
          continue;
        }
        // JSON columns come back parsed on PostgreSQL, and numeric ones may come back as text.
        const text = Buffer.isBuffer(value) ? value.toString('utf8') : typeof value === 'object' && !(value instanceof Date) ? JSON.stringify(value) : String(value);
        if (/^-?\d+(\.\d+)?$/.test(text) && numbers.some((n) => Math.abs(n - Number(text)) < 1e-9)) found.push(`${name}.${column} = ${text}`);
        for (const needle of [...texts, ...addresses]) if (text.includes(needle)) found.push(`${name}.${column} ∋ ${needle}`);
      }
    }
  }
  return found;
}

describe('answer insight stores no visitor value and no address', () => {
  it('after 1 000 answers with distinctive values, none of them (nor the callers\' addresses) is in any table', async () => {
    liftScoringLimits();
    const calc = await insightCalculator();
    const numbers: number[] = [];
    const addresses: string[] = [];
    const sent: Promise<unknown>[] = [];
    for (let i = 0; i < 1000; i++) {
      // Six decimals, the last one never 0, so each value has one spelling: 73.123456 and its kin.
      const speed = Number((11.123457 + i * 0.031111).toFixed(6));
      const distance = Number((73.123456 + i * 0.400001).toFixed(6));
      const climb = Number((123.654321 + i * 2.700003).toFixed(6));
      numbers.push(speed, distance, climb);
      const address = `203.0.113.${i % 250}:${40000 + i}`;
      addresses.push(address);
      sent.push(answer(calc.embed.token, { avg_speed_kmh: speed, weekly_distance_km: distance, climb_per_ride_m: i % 3 === 0 ? null : climb }, address));
    }
    await Promise.all(sent);
    await flushUsage();
    expect(await InsightCount.sum('count', { where: { embedId: calc.embed.id, kind: 'answers' } })).toBe(1000);
    const texts = numbers.map((n) => n.toFixed(6));
    expect(await findAnywhere(texts, numbers, addresses)).toEqual([]);

    // The scan itself finds a value where one is stored.
    await sequelize.query('CREATE TABLE scan_check (v REAL, t TEXT)');
    await sequelize.query('INSERT INTO scan_check VALUES (?, ?)', { replacements: [numbers[5], `{"x":${texts[7]}}`] });
    expect(await findAnywhere(texts, numbers, addresses)).toEqual([`scan_check.v = ${numbers[5]}`, `scan_check.t ∋ ${texts[7]}`]);
    await sequelize.query('DROP TABLE scan_check');
  });
});
