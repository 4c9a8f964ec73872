import { statusWords } from '@/lib/embeds/status-words';

const STYLE: Record<string, string> = {
  active: 'bg-moss-100 text-moss-700',
  disabled: 'bg-clay-100 text-clay-700',
  retired: 'bg-paper-deep text-ink-soft',
  damaged: 'bg-clay-100 text-clay-700',
};

export function StatusPill({ status }: { status: string }) {
  return <span className={`inline-block rounded-full px-3 py-0.5 text-xs font-bold ${STYLE[status] ?? 'bg-paper-deep text-ink-soft'}`}>{statusWords(status)}</span>;
}
