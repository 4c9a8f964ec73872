'use client';
import { useEffect, useId, useMemo, useRef, useState, type FormEvent } from 'react';
import type { CalculatorProps } from '@/lib/embeds/calculator-page';
import type { AnswerReason as Reason } from '@/lib/scoring/score';
import { AnswerReason } from './AnswerReason';
import { MembershipChart, preloadChart, type MembershipRow } from './MembershipChart';
import { formatProbability as formatPercent } from '@/lib/format';
import { ReportForm } from './ReportForm';
import { blankTexts } from './texts';
import { useHostSize } from './useHostSize';

interface Answer {
  probabilities: { index: number; label: string; color: string; probability: number }[];
  best: { index: number; label: string; description: string; probability: number };
  typicality: number;
  unusual: boolean;
  threshold: number;
  /** Features the answer was worked out from / left blank, in field order. */
  used: string[];
  unused: string[];
  reason: Reason | null;
}

/** A message above the answer; `untilEdit` ones are about the values on screen and go when a value changes. */
type Notice = { tone: 'calm' | 'problem'; text: string; untilEdit?: boolean } | null;

/** An answer and the exact numbers it was worked out for. */
interface Shown {
  data: Answer;
  key: string;
}

type Field = CalculatorProps['fields'][number];

const rangeText = (f: Field) => `${f.min} to ${f.max}${f.unit ? ` ${f.unit}` : ''}`;

/** Parse what a visitor typed: a plain decimal number (a comma works as the decimal mark). */
function readNumber(text: string): number | null {
  const t = text.trim().replace(/^([+-]?\d*),(\d+)$/, '$1.$2');
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

/** The same checks the server makes, so most mistakes are explained before sending. */
function checkField(f: Field, text: string): string | null {
  if (!text.trim()) return f.optional ? null : `Enter ${f.label}.`;
  const v = readNumber(text);
  if (v === null) return `${f.label} must be a number.`;
  if (v < f.min || v > f.max) return `${f.label} must be between ${f.min} and ${f.max}${f.unit ? ` ${f.unit}` : ''}.`;
  return null;
}

/**
 * The numbers the typed values stand for, or null while any is missing or invalid.
 * "24,5" and "24.5" have the same key: equal keys would get the same answer.
 */
function valuesKey(fields: Field[], values: Record<string, string>): string | null {
  const numbers: (number | null)[] = [];
  for (const f of fields) {
    const text = values[f.feature] ?? '';
    if (checkField(f, text)) return null;
    // A blank optional field is part of the key: filling it in asks a new question.
    numbers.push(text.trim() ? readNumber(text) : null);
  }
  return JSON.stringify(numbers);
}

export function Calculator(props: CalculatorProps) {
  const { token, title, fields, caution, chartSpec, hostOrigin } = props;
  useHostSize(token, hostOrigin);
  const formId = useId();
  const [values, setValues] = useState<Record<string, string>>(() => Object.fromEntries(fields.map((f) => [f.feature, ''])));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);
  const [shown, setShown] = useState<Shown | null>(null);
  const [notice, setNotice] = useState<Notice>(null);
  const inputs = useRef<Record<string, HTMLInputElement | null>>({});
  // Guards against a second submit before React has re-rendered the disabled button.
  const inFlight = useRef(false);
  const answer = shown?.data ?? null;
  // The answer on screen no longer matches what the form says (edited, emptied or invalid).
  const stale = shown !== null && valuesKey(fields, values) !== shown.key;

  // Hydrated: the form now answers (until then the button is disabled, so an early click
  // cannot submit the values natively into the address). The mark is what the benchmark reads.
  const [interactive, setInteractive] = useState(false);
  useEffect(() => {
    setInteractive(true);
    performance.mark('partwise:interactive');
    document.getElementById('partwise-calculator-root')?.setAttribute('data-interactive', 'true');
  }, []);

  const focusFirst = (errs: Record<string, string>) => {
    const first = fields.find((f) => errs[f.feature]);
    if (first) inputs.current[first.feature]?.focus();
  };

  async function submit(event: FormEvent) {
    event.preventDefault();
    if (inFlight.current) return;
    const errs: Record<string, string> = {};
    for (const f of fields) {
      const e = checkField(f, values[f.feature] ?? '');
      if (e) errs[f.feature] = e;
    }
    setErrors(errs);
    if (Object.keys(errs).length) {
      focusFirst(errs);
      return;
    }
    const key = valuesKey(fields, values)!;
    if (shown && shown.key === key) {
      // The same numbers would get the same answer: nothing is sent or counted.
      setNotice({ tone: 'calm', text: 'The answer below is already for these values. Change a value to see a new one.', untilEdit: true });
      return;
    }
    inFlight.current = true;
    setBusy(true);
    setNotice(null);
    preloadChart();
    try {
      // A blank optional field is sent as null: not observed, answered from the other fields.
      const body = { values: Object.fromEntries(fields.map((f) => [f.feature, (values[f.feature] ?? '').trim() ? readNumber(values[f.feature]) : null])) };
      const res = await fetch(`/api/score/${encodeURIComponent(token)}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
      const data = await res.json().catch(() => null);
      if (res.ok) {
        setShown({ data: data as Answer, key });
        return;
      }
      setShown(null);
      const message: string = data?.error?.message ?? '';
      if (res.status === 422 && Array.isArray(data?.error?.issues)) {
        const fromServer: Record<string, string> = {};
        for (const issue of data.error.issues as { field: string; message: string }[]) {
          const feature = issue.field.replace(/^values\./, '');
          if (fields.some((f) => f.feature === feature)) fromServer[feature] = issue.message;
        }
        setErrors(fromServer);
        focusFirst(fromServer);
        if (!Object.keys(fromServer).length) setNotice({ tone: 'problem', text: message || 'Some values could not be used.' });
      } else if (res.status === 429) {
        // The server says whether this visitor sent many answers or the calculator as a whole is busy.
        const wait = res.headers.get('retry-after');
        setNotice({ tone: 'calm', text: message || `That was a lot of tries in a short time. Please wait ${wait ? `${wait} seconds` : 'a moment'} and try again.` });
      } else if (res.status === 503) {
        setNotice({ tone: 'calm', text: 'This calculator is taking a short break and will answer again soon. Nothing is wrong with your values.' });
      } else if (res.status === 410 || res.status === 404) {
        setNotice({ tone: 'calm', text: 'This calculator is not available any more.' });
      } else {
        setNotice({ tone: 'problem', text: 'Something went wrong on our side. Please try again.' });
      }
    } catch {
      setShown(null);
      setNotice({ tone: 'problem', text: 'The answer could not be fetched. Check the connection and try again.' });
    } finally {
      inFlight.current = false;
      setBusy(false);
    }
  }

  // Kept while the visitor types, so the chart is drawn once per answer, not per keystroke.
  const labelOf = (feature: string) => fields.find((f) => f.feature === feature)?.label ?? feature;
  const rows: MembershipRow[] = useMemo(() => (answer ? answer.probabilities.map((p) => ({ label: p.label, probability: p.probability, color: p.color })) : []), [answer]);

  return (
    <div className="space-y-5">
      <header>
        <h1 className="text-xl font-bold leading-tight text-ink dark:text-[#f3efe7]">{title}</h1>
        <p className="mt-1 text-sm text-ink-soft dark:text-[#b9bfcc]">Enter your values to see how closely they resemble each group.</p>
      </header>

      <form id={formId} noValidate onSubmit={submit} onFocus={() => void preloadChart()} className="space-y-4" aria-describedby={`${formId}-caution`}>
        {fields.map((f) => {
          const id = `${formId}-${f.feature}`;
          const error = errors[f.feature];
          // The error first, then the hint (the help text sits inside the range line, so it is read once).
          const described = [error ? `${id}-error` : '', `${id}-range`].filter(Boolean).join(' ');
          return (
            <div key={f.feature}>
              <label htmlFor={id} className="mb-1 block text-sm font-bold text-ink-soft dark:text-[#d5d9e2]">
                {f.label}
                {f.unit && <span className="font-normal"> ({f.unit})</span>}
                {f.optional && <span className="font-normal"> ({blankTexts.optionalMark})</span>}
              </label>
              <input
                ref={(el) => {
                  inputs.current[f.feature] = el;
                }}
                id={id}
                name={f.feature}
                type="text"
                inputMode="decimal"
                autoComplete="off"
                required={!f.optional}
                aria-required={f.optional ? undefined : 'true'}
                aria-invalid={error ? true : undefined}
                aria-describedby={described}
                data-min={f.min}
                data-max={f.max}
                value={values[f.feature] ?? ''}
                onChange={(e) => {
                  const text = e.target.value;
                  setValues((v) => ({ ...v, [f.feature]: text }));
                  setNotice((n) => (n?.untilEdit ? null : n));
                  if (errors[f.feature]) setErrors((errs) => ({ ...errs, [f.feature]: checkField(f, text) ?? '' }));
                }}
                onBlur={(e) => {
                  if (e.target.value.trim()) setErrors((errs) => ({ ...errs, [f.feature]: checkField(f, e.target.value) ?? '' }));
                }}
                className="block w-full rounded-lg border border-ink/50 bg-white px-3 py-2 text-base text-ink focus:outline-none focus:ring-2 focus:ring-[var(--accent)] aria-[invalid=true]:border-clay-500 dark:border-white/45 dark:bg-[#1c2130] dark:text-[#f3efe7] dark:aria-[invalid=true]:border-[#f1a595]"
              />
              <p id={`${id}-range`} className="mt-1 text-xs text-ink-soft dark:text-[#a9b0bf]">
                {f.help ? <span id={`${id}-help`}>{f.help} </span> : null}
                Accepted: {rangeText(f)}.{f.optional ? ` ${blankTexts.optionalHint}` : null}
              </p>
              {/* Always there, so a screen reader speaks an error as it appears (it is also linked to the field). */}
              <div aria-live="polite" data-testid={`error-region-${f.feature}`}>
                {error && (
                  <p id={`${id}-error`} className="mt-1 text-sm font-bold text-clay-700 dark:text-[#f1a595]">
                    {error}
                  </p>
                )}
              </div>
            </div>
          );
        })}
        <button type="submit" disabled={busy || !interactive} className="inline-flex w-full items-center justify-center rounded-full px-5 py-2.5 text-sm font-bold transition disabled:opacity-60 sm:w-auto" style={{ backgroundColor: 'var(--accent)', color: 'var(--accent-text)' }}>
          {busy ? 'Working it out…' : 'Show my groups'}
        </button>
      </form>

      <section aria-live="polite" aria-atomic="false" aria-label="Result" className="space-y-3">
        {notice && (
          <p role={notice.tone === 'problem' ? 'alert' : 'status'} className={`rounded-lg px-3 py-2 text-sm ${notice.tone === 'problem' ? 'bg-clay-100 text-clay-700' : 'bg-paper-deep text-ink dark:bg-[#262c3d] dark:text-[#e8e4dc]'}`}>
            {notice.text}
          </p>
        )}
        {answer && (
          <div className="space-y-3 rounded-xl border border-ink/10 p-4 dark:border-white/15" data-testid="answer" data-stale={stale ? 'true' : undefined}>
            {stale && (
              <p className="rounded-lg bg-paper-deep px-3 py-2 text-sm text-ink dark:bg-[#262c3d] dark:text-[#e8e4dc]" data-testid="stale-notice">
                You changed your values. The answer below is for the earlier ones; press &ldquo;Show my groups&rdquo; to update it.
              </p>
            )}
            {/* Stale: greyed, yet its text keeps 4.5:1 (a fainter fade would make it unreadable). */}
            <div className={`space-y-3 transition ${stale ? 'opacity-80 grayscale' : ''}`}>
              {answer.unusual ? (
                // Values far from all the data: the message leads, the nearest group is only mentioned.
                <div className="space-y-1 rounded-lg border border-saffron-500/60 bg-saffron-100 px-3 py-2 text-ink" data-testid="unusual-notice">
                  <h2 className="font-sans text-base font-bold">These values are unusual for this calculator</h2>
                  <p className="text-sm">
                    They are unlike the data it was built from, so none of the groups describes them well. The nearest is {answer.best.label}; read the
                    percentages below with that in mind.
                  </p>
                </div>
              ) : (
                <>
                  <h2 className="font-sans text-base font-bold text-ink dark:text-[#f3efe7]">
                    Most like: <span>{answer.best.label}</span>
                    <span className="font-normal"> ({formatPercent(answer.best.probability)})</span>
                  </h2>
                  {answer.best.description && <p className="text-sm text-ink-soft dark:text-[#c9ced8]">{answer.best.description}</p>}
                </>
              )}
              {answer.unused.length > 0 && (
                <p className="text-sm text-ink-soft dark:text-[#c9ced8]" data-testid="unused-fields">
                  {blankTexts.notUsed(answer.unused.map(labelOf))}
                </p>
              )}
              <MembershipChart spec={chartSpec} rows={rows} />
              {answer.reason && <AnswerReason reason={answer.reason} groups={answer.probabilities} labelOf={labelOf} />}
            </div>
          </div>
        )}
      </section>

      <footer id={`${formId}-caution`} className="space-y-2 border-t border-ink/10 pt-3 text-xs text-ink-soft dark:border-white/15 dark:text-[#a9b0bf]">
        {caution && <p className="text-sm text-ink dark:text-[#e8e4dc]">{caution}</p>}
        <p>
          The probabilities describe how similar your values are to groups found in the publisher&rsquo;s data. They are not a diagnosis, a rating or a decision about you.
        </p>
        <ReportForm token={token} hostOrigin={hostOrigin} />
      </footer>
    </div>
  );
}
