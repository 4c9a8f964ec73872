import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { AppError } from '@/lib/errors';
import { decimalId, decimalIndex, parseDecimalId } from '@/lib/http/ids';
import { storedText, textProblem } from '@/lib/http/text';
import { parseCsvText } from '@/lib/datasets/parse';
import { hasMalformedEncoding, isApiPath } from '@/lib/server/odd-requests';

describe('decimal ids', () => {
  it('accept plain decimal digits only', () => {
    for (const [raw, want] of [['1', 1], ['12', 12], ['9007199254740991', 9007199254740991]] as const) expect(parseDecimalId(raw)).toBe(want);
    for (const raw of ['0', '06', '0x6', '6e0', '1e400', 'Infinity', '-1', '+6', ' 6', '6 ', '6.0', '6.5', '', '9007199254740993', '1'.repeat(17), '6\u0000', '٦', undefined, 6]) {
      expect(parseDecimalId(raw), String(raw)).toBeNull();
    }
  });

  it('give zod issues instead of numbers for anything else', () => {
    expect(z.object({ id: decimalId() }).parse({ id: '42' })).toEqual({ id: 42 });
    const bad = z.object({ id: decimalId() }).safeParse({ id: '0x2a' });
    expect(bad.success).toBe(false);
    expect(bad.error!.issues[0]).toMatchObject({ path: ['id'], message: expect.stringMatching(/written in digits/) });
    expect(decimalIndex().parse('0')).toBe(0);
    expect(decimalIndex().safeParse('1e1').success).toBe(false);
  });
});

describe('stored text', () => {
  it('refuses NUL and unpaired surrogates, keeps real pairs and ordinary text', () => {
    expect(textProblem('Climbers 🚵 ünd Sprinter')).toBeNull();
    expect(textProblem('a\u0000b')).toMatch(/NUL/);
    for (const s of ['\ud83d', 'x\ud83dy', '\ude80', 'x\ude80\ud83d']) expect(textProblem(s), JSON.stringify(s)).toMatch(/surrogate/);
    const title = storedText('The title').trim().min(1).max(20);
    expect(title.parse('  Rides  ')).toBe('Rides');
    const r = title.safeParse('Ri\u0000des');
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].message).toBe('The title contains a NUL character (\\u0000), which text cannot hold.');
  });
});

describe('CSV text that cannot be stored', () => {
  const rows = (cell: string) => ['rider,speed,distance', ...Array.from({ length: 12 }, (_, i) => `${i === 4 ? cell : `r${i}`},${20 + i},${50 + i}`)].join('\n');
  const refusal = (text: string): AppError => {
    try {
      parseCsvText(text);
    } catch (e) {
      return e as AppError;
    }
    throw new Error('parsed');
  };

  it('names the row and column of an unpaired surrogate', () => {
    const e = refusal(rows('r\ud83d4'));
    expect(e.status).toBe(422);
    expect(e.message).toMatch(/Row 6, column "rider" contains a broken character/);
    expect(e.issues).toEqual([{ field: 'row 6, column rider', message: expect.stringMatching(/unpaired UTF-16 surrogate/) }]);
  });

  it('names the column of a header name with a NUL', () => {
    const e = refusal(rows('r4').replace('speed', 'spe\u0000ed'));
    expect(e.issues).toEqual([{ field: 'column 2', message: expect.stringMatching(/name of column 2 \(row 1\) contains a NUL/) }]);
  });

  it('still parses a file with emoji in text cells', () => {
    expect(parseCsvText(rows('Rider 🚵')).cells[4][0]).toBe('Rider 🚵');
  });
});

describe('request paths', () => {
  it('find broken percent-encoding in the path only', () => {
    for (const p of ['/embed/%E0%A4%A', '/studio/models/%ZZ', '/api/x/%', '/a/%ED%A0%80', '/%C0%AF']) expect(hasMalformedEncoding(p), p).toBe(true);
    for (const p of ['/embed/abc', '/a%20b', '/x/%F0%9F%9A%B5', '/api/x?q=%ZZ', '/%00']) expect(hasMalformedEncoding(p), p).toBe(false);
    expect(isApiPath('/api')).toBe(true);
    expect(isApiPath('/api/x?y')).toBe(true);
    expect(isApiPath('/apix')).toBe(false);
  });
});

describe('clipping stored text', () => {
  it('never leaves half of a surrogate pair', async () => {
    const { clipText } = await import('@/lib/http/text');
    const name = `${'a'.repeat(199)}🚵 ride`;
    expect(clipText(name, 200)).toBe('a'.repeat(199));
    expect(textProblem(clipText(name, 200))).toBeNull();
    expect(clipText(name, 201)).toBe(`${'a'.repeat(199)}🚵`);
    expect(clipText('short', 200)).toBe('short');
  });
});

describe('calculator frame policy', () => {
  it('treats a token with a broken % escape as an unknown calculator instead of throwing', async () => {
    const { framePolicyForPath } = await import('@/lib/embeds/frame-policy');
    for (const p of ['/embed/%E0%A4%A', '/embed/%ZZ']) {
      const policy = await framePolicyForPath(p);
      expect(policy, p).toMatch(/^frame-ancestors 'self'; /);
    }
  });
});
