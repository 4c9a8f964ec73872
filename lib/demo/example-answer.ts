import { scoreRow, type MixtureModel as EngineModel } from '@/lib/mixture';

/**
 * The landing page's example answer: values a visitor could type into the demo
 * calculator and what the calculator's scoring (lib/mixture's scoreRow, the same call the
 * scoring route makes) answers for them. The values are picked, not invented: round
 * numbers between two groups' centres where the answer is clearly mixed (the top group
 * well short of certain, a second group clearly present) and the values are ordinary for
 * the data, so the example shows what a membership probability is for.
 */
export interface ExampleField {
  feature: string;
  label: string;
  unit: string;
  min: number;
  max: number;
}

export interface ExampleAnswer {
  values: { feature: string; label: string; unit: string; value: number }[];
  probabilities: { label: string; color: string; probability: number }[];
  best: { label: string; probability: number };
  typicality: number;
}

/** A round step for a field: 1, 2 or 5 times a power of ten, about a twentieth of its range. */
export function roundStep(min: number, max: number): number {
  const rough = (max - min) / 20;
  if (!(rough > 0)) return 1;
  const power = 10 ** Math.floor(Math.log10(rough));
  const [step] = [5, 2, 1].map((m) => m * power).filter((s) => s <= rough);
  return step ?? power;
}

const roundTo = (v: number, step: number) => Number((Math.round(v / step) * step).toPrecision(12));

/** How far an answer is from the kind of example we want (lower is better). */
function distanceFromIdeal(top: number, second: number): number {
  return Math.abs(top - 0.68) + (second < 0.15 ? 0.15 - second : 0);
}

export function chooseExample(engine: EngineModel, fields: ExampleField[], clusters: { label: string; color: string }[], unusualBelow: number): ExampleAnswer {
  const k = engine.weights.length;
  const column = fields.map((f) => engine.features.findIndex((x) => x.name === f.feature));
  const steps = fields.map((f) => roundStep(f.min, f.max));
  const pointBetween = (a: number, b: number, t: number) =>
    fields.map((f, j) => {
      const from = engine.means[a][column[j]];
      const to = engine.means[b][column[j]];
      return Math.min(f.max, Math.max(f.min, roundTo(from + t * (to - from), steps[j])));
    });

  const seen = new Set<string>();
  const candidates: { values: number[]; score: ReturnType<typeof scoreRow>; rank: number }[] = [];
  const consider = (values: number[]) => {
    const key = values.join(',');
    if (seen.has(key)) return;
    seen.add(key);
    const score = scoreRow(engine, values, { unusualBelow });
    const sorted = [...score.probabilities].sort((x, y) => y - x);
    // Unusual or rare values would teach the wrong lesson; they rank after every ordinary one.
    const rank = distanceFromIdeal(sorted[0], sorted[1] ?? 0) + (score.unusual ? 10 : score.typicality < 10 ? 5 : 0);
    candidates.push({ values, score, rank });
  };
  for (let a = 0; a < k; a++) for (let b = a + 1; b < k; b++) for (let i = 2; i <= 8; i++) consider(pointBetween(a, b, i / 10));
  // A one-group model has no "between": its centre is the example.
  if (!candidates.length) consider(pointBetween(0, 0, 0));
  // The first of the best keeps the choice deterministic.
  const chosen = candidates.reduce((x, y) => (y.rank < x.rank - 1e-12 ? y : x));

  return {
    values: fields.map((f, j) => ({ feature: f.feature, label: f.label, unit: f.unit, value: chosen.values[j] })),
    probabilities: chosen.score.probabilities.map((p, c) => ({ label: clusters[c]?.label ?? `Group ${c + 1}`, color: clusters[c]?.color ?? '#8a91a0', probability: p })),
    best: { label: clusters[chosen.score.best]?.label ?? `Group ${chosen.score.best + 1}`, probability: chosen.score.probabilities[chosen.score.best] },
    typicality: chosen.score.typicality,
  };
}
