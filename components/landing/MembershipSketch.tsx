/** A static picture of a calculator answer for the landing page (no data, no script). */
const groups = [
  { label: 'Steady tourers', share: 0.71, color: '#3a8a74' },
  { label: 'Hill chasers', share: 0.22, color: '#e0a526' },
  { label: 'Fast pack', share: 0.07, color: '#b8432f' },
];

export function MembershipSketch() {
  return (
    <figure className="pw-card p-6" aria-label="Example of a calculator answer">
      <p className="text-sm font-bold text-ink-soft">Which ride group suits you?</p>
      <div className="mt-4 grid grid-cols-3 gap-3 text-sm">
        {['24 km/h', '120 km/week', '450 m/ride'].map((v) => (
          <span key={v} className="rounded-lg bg-paper-deep px-3 py-2 text-center font-bold text-ink">{v}</span>
        ))}
      </div>
      <ul className="mt-6 space-y-3">
        {groups.map((g) => (
          <li key={g.label}>
            <div className="flex justify-between text-sm"><span>{g.label}</span><span className="font-bold">{Math.round(g.share * 100)}%</span></div>
            <div className="mt-1 h-3 rounded-full bg-paper-deep">
              <div className="h-3 rounded-full" style={{ width: `${g.share * 100}%`, backgroundColor: g.color }} />
            </div>
          </li>
        ))}
      </ul>
      <figcaption className="mt-5 text-xs text-ink-faint">Similarity to groups in the club&apos;s own ride logs — not a verdict.</figcaption>
    </figure>
  );
}
