import { statusWords } from '@/lib/embeds/status-words';

const STYLE: Record<string, string> = {
  active: 'bg-moss-100 text-moss-700',
  disabled: 'bg-clay-100 text-clay-700',
  retired: 'bg-paper-deep text-ink-soft',
};

/** A calculator's state as staff need it: its own status plus review flag and suspension. */
export function SupportStatus({ status, flagged, suspended }: { status: string; flagged?: boolean; suspended?: boolean }) {
  const label = statusWords(status);
  const cls = STYLE[status] ?? 'bg-paper-deep text-ink-soft';
  return (
    <span className="flex flex-wrap gap-1">
      <span className={`inline-block whitespace-nowrap rounded-full px-2.5 py-0.5 text-xs font-bold ${cls}`}>{label}</span>
      {flagged ? <span className="inline-block whitespace-nowrap rounded-full bg-saffron-300 px-2.5 py-0.5 text-xs font-bold text-ink">Spike flagged</span> : null}
      {suspended ? <span className="inline-block whitespace-nowrap rounded-full bg-dusk-800 px-2.5 py-0.5 text-xs font-bold text-white">Workspace suspended</span> : null}
    </span>
  );
}
