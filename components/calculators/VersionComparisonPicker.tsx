import { formatDate } from '@/lib/format';

interface PickerVersion {
  id: number;
  number: number;
  createdAt: string;
}

/** Which two versions to compare: a plain GET form, so the choice lives in the address. */
export function VersionComparisonPicker({ embedId, versions, servedId, fromId, toId }: { embedId: number; versions: PickerVersion[]; servedId: number | null; fromId: number; toId: number }) {
  const option = (v: PickerVersion) => (
    <option key={v.id} value={v.id}>
      v{v.number}
      {v.id === servedId ? ' (served)' : ''} · {formatDate(v.createdAt)}
    </option>
  );
  return (
    <form method="get" action={`/studio/calculators/${embedId}/compare`} className="flex flex-wrap items-end gap-3" data-testid="compare-picker">
      <div className="min-w-[11rem]">
        <label htmlFor="compare-from" className="pw-label">Compare</label>
        <select id="compare-from" name="from" defaultValue={fromId} className="pw-input">
          {versions.map(option)}
        </select>
      </div>
      <div className="min-w-[11rem]">
        <label htmlFor="compare-to" className="pw-label">with</label>
        <select id="compare-to" name="to" defaultValue={toId} className="pw-input">
          {versions.map(option)}
        </select>
      </div>
      <button type="submit" className="pw-button-quiet">Compare these</button>
    </form>
  );
}
