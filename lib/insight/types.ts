export type DriftBand = 'stable' | 'watch' | 'act';
export interface InsightGroup { index: number; label: string; color: string }
export interface InsightVersion { id: number; number: number; groups: InsightGroup[] }
/** One UTC day of one version. */
export interface InsightDay { day: string; versionId: number; answers: number; unusual: number; withBlanks: number; byGroup: number[] /* index = the version's group index */ }
export interface InsightFieldDrift { psi: number | null; band: DriftBand | null; answers: number }
export interface InsightField {
  feature: string; label: string; unit: string;
  /** bin edges, length bins+1; the first and last bins are "below min" / "above max" and open-ended */
  edges: number[];
  training: number[];      // counts per bin
  visitors: number[];      // counts per bin over the report window (the chosen version or all versions with the same bins)
  blanks: number;          // visitors who left the field blank in the window
  last7: InsightFieldDrift; last30: InsightFieldDrift;
}
export interface InsightAlertSettings { subscribed: boolean; driftThreshold: number; unusualShare: number; lastSentAt: string | null }
export interface InsightReport {
  embedId: number; enabled: boolean; retentionMonths: number;
  demo: boolean;            // true when the numbers are seeded demo aggregates
  from: string; to: string; // UTC days, inclusive
  versionId: number | null; // the filter, null = all
  servedVersionId: number | null;
  versions: InsightVersion[];
  days: InsightDay[];
  fields: InsightField[];    // of the chosen version, or the served one when all
  trainingSource: 'dataset' | 'model-sample';
  overall: { last7: InsightFieldDrift; last30: InsightFieldDrift };
  alerts: InsightAlertSettings; // of the signed-in member
}
