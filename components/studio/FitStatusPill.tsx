const STYLE: Record<string, string> = {
  queued: 'bg-paper-deep text-ink-soft',
  running: 'bg-saffron-100 text-saffron-700',
  succeeded: 'bg-moss-100 text-moss-700',
  failed: 'bg-clay-100 text-clay-700',
  cancelled: 'bg-paper-deep text-ink-soft',
};
const LABEL: Record<string, string> = { queued: 'waiting', running: 'fitting', succeeded: 'done', failed: 'failed', cancelled: 'cancelled' };

export function FitStatusPill({ status }: { status: string }) {
  return <span className={`rounded-full px-2.5 py-0.5 text-xs font-bold ${STYLE[status] ?? STYLE.queued}`}>{LABEL[status] ?? status}</span>;
}
