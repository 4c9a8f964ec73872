const STYLE: Record<string, [string, string]> = {
  active: ['Live', 'bg-moss-100 text-moss-700'],
  disabled: ['Disabled by support', 'bg-clay-100 text-clay-700'],
  retired: ['Retired', 'bg-paper-deep text-ink-soft'],
  // Active, but the version it serves is damaged: visitors see "not available".
  damaged: ['Not answering', 'bg-clay-100 text-clay-700'],
};

export function StatusPill({ status }: { status: string }) {
  const [label, cls] = STYLE[status] ?? [status, 'bg-paper-deep text-ink-soft'];
  return <span className={`inline-block rounded-full px-3 py-0.5 text-xs font-bold ${cls}`}>{label}</span>;
}
