'use client';
import { useEffect, useId, useMemo, useRef, useState, type FormEvent } from 'react';
import type { CalculatorProps } from '@/lib/embeds/calculator-page';
import type { AnswerReason as Reason } from '@/lib/scoring/score';
import { AnswerReason } from './AnswerReason';
import { MembershipChart, preloadChart, type MembershipRow } from './MembershipChart';
import { formatInputNumber, formatProbability } from '@/lib/format';
import { localeOf, type Language } from '@/lib/i18n/languages';
import { parseLocaleNumber } from '@/lib/number-input';
import { messagesFor, type Messages } from './messages';
import { ReportForm } from './ReportForm';
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

/** How this calculator speaks: its messages and the locale its numbers are read and written in. */
interface Speech {
  language: Language;
  locale: string;
  t: Messages;
}

const numberText = (v: number, sp: Speech) => formatInputNumber(v, sp.locale);

/** Parse what a visitor typed, the calculator language's way ("31,5" in German). */
function readNumber(text: string, sp: Speech): number | null {
  const parsed = parseLocaleNumber(text, sp.language);
  return parsed.ok ? parsed.value : null;
}

/** The same checks the server makes, so most mistakes are explained before sending. */
function checkField(f: Field, text: string, sp: Speech): string | null {
  const { t } = sp;
  if (!text.trim()) return f.optional ? null : t.fieldRequired(f.label);
  const parsed = parseLocaleNumber(text, sp.language);
  const example = numberText(1234.5, sp);
  if (!parsed.ok) return parsed.problem === 'ambiguous' ? t.ambiguous(f.label, example) : t.notNumber(f.label, example);
  if (parsed.value < f.min || parsed.value > f.max) return t.outOfRange(f.label, numberText(f.min, sp), numberText(f.max, sp), f.unit);
  return null;
}

/**
 * The numbers the typed values stand for, or null while any is missing or invalid.
 * "24,5" and "24.5" have the same key: equal keys would get the same answer.
 */
function valuesKey(fields: Field[], values: Record<string, string>, sp: Speech): string | null {
  const numbers: (number | null)[] = [];
  for (const f of fields) {
    const text = values[f.feature] ?? '';
    if (checkField(f, text, sp)) return null;
    // A blank optional field is part of the key: filling it in asks a new question.
    numbers.push(text.trim() ? readNumber(text, sp) : null);
  }
  return JSON.stringify(numbers);
}

export function Calculator(props: CalculatorProps) {
  const { token, title, fields, caution, chartSpec, hostOrigin, language } = props;
  const sp: Speech = useMemo(() => ({ language, locale: localeOf(language), t: messagesFor(language) }), [language]);
  const t = sp.t;
  const formatPercent = useMemo(() => (p: number) => formatProbability(p, { locale: sp.locale, over: t.over, under: t.under }), [sp, t]);
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
  const stale = shown !== null && valuesKey(fields, values, sp) !== shown.key;

  // Hydrated: the form now answers (until then the button is disabled, so an early click
  // cannot submit the values natively into the address). The mark is what the benchmark reads.
  const [interactive, setInteractive] = useState(false);
  useEffect(() => {
    setInteractive(true);
    performance.mark('partwise:interactive');
    // The server renders the calculator root with its language; the document follows once hydrated.
    document.documentElement.lang = language;
    document.getElementById('partwise-calculator-root')?.setAttribute('data-interactive', 'true');
  }, [language]);

  const focusFirst = (errs: Record<string, string>) => {
    const first = fields.find((f) => errs[f.feature]);
    if (first) inputs.current[first.feature]?.focus();
  };

  async function submit(event: FormEvent) {
    event.preventDefault();
    if (inFlight.current) return;
    const errs: Record<string, string> = {};
    for (const f of fields) {
      const e = checkField(f, values[f.feature] ?? '', sp);
      if (e) errs[f.feature] = e;
    }
    setErrors(errs);
    if (Object.keys(errs).length) {
      focusFirst(errs);
      return;
    }
    const key = valuesKey(fields, values, sp)!;
    if (shown && shown.key === key) {
      // The same numbers would get the same answer: nothing is sent or counted.
      setNotice({ tone: 'calm', text: t.alreadyShown, untilEdit: true });
      return;
    }
    inFlight.current = true;
    setBusy(true);
    setNotice(null);
    preloadChart();
    try {
      // A blank optional field is sent as null: not observed, answered from the other fields.
      const body = { values: Object.fromEntries(fields.map((f) => [f.feature, (values[f.feature] ?? '').trim() ? readNumber(values[f.feature], sp) : null])) };
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
          const field = fields.find((f) => f.feature === feature);
          // The server words its reasons in English; other languages get their own sentence.
          if (field) fromServer[feature] = language === 'en' ? issue.message : (checkField(field, values[feature] ?? '', sp) ?? t.fieldRefused(field.label));
        }
        setErrors(fromServer);
        focusFirst(fromServer);
        if (!Object.keys(fromServer).length) setNotice({ tone: 'problem', text: language === 'en' && message ? message : t.someValuesUnusable });
      } else if (res.status === 429) {
        // The server says whether this visitor sent many answers or the calculator as a whole is busy.
        const wait = res.headers.get('retry-after');
        setNotice({ tone: 'calm', text: language === 'en' && message ? message : t.tooMany(wait && /^\d+$/.test(wait) ? wait : null) });
      } else if (res.status === 503) {
        setNotice({ tone: 'calm', text: t.paused });
      } else if (res.status === 410 || res.status === 404) {
        setNotice({ tone: 'calm', text: t.gone });
      } else {
        setNotice({ tone: 'problem', text: t.serverProblem });
      }
    } catch {
      setShown(null);
      setNotice({ tone: 'problem', text: t.offline });
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
        <p className="mt-1 text-sm text-ink-soft dark:text-[#b9bfcc]">{t.intro}</p>
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
                {f.optional && <span className="font-normal"> ({t.optionalMark})</span>}
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
                  if (errors[f.feature]) setErrors((errs) => ({ ...errs, [f.feature]: checkField(f, text, sp) ?? '' }));
                }}
                onBlur={(e) => {
                  if (e.target.value.trim()) setErrors((errs) => ({ ...errs, [f.feature]: checkField(f, e.target.value, sp) ?? '' }));
                }}
                className="block w-full rounded-lg border border-ink/50 bg-white px-3 py-2 text-base text-ink focus:outline-none focus:ring-2 focus:ring-[var(--accent)] aria-[invalid=true]:border-clay-500 dark:border-white/45 dark:bg-[#1c2130] dark:text-[#f3efe7] dark:aria-[invalid=true]:border-[#f1a595]"
              />
              <p id={`${id}-range`} className="mt-1 text-xs text-ink-soft dark:text-[#a9b0bf]">
                {f.help ? <span id={`${id}-help`}>{f.help} </span> : null}
                {t.accepted(numberText(f.min, sp), numberText(f.max, sp), f.unit)}{f.optional ? ` ${t.optionalHint}` : null}
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
          {busy ? t.busy : t.submit}
        </button>
      </form>

      <section aria-live="polite" aria-atomic="false" aria-label={t.resultLabel} className="space-y-3">
        {notice && (
          <p role={notice.tone === 'problem' ? 'alert' : 'status'} className={`rounded-lg px-3 py-2 text-sm ${notice.tone === 'problem' ? 'bg-clay-100 text-clay-700' : 'bg-paper-deep text-ink dark:bg-[#262c3d] dark:text-[#e8e4dc]'}`}>
            {notice.text}
          </p>
        )}
        {answer && (
          <div className="space-y-3 rounded-xl border border-ink/10 p-4 dark:border-white/15" data-testid="answer" data-stale={stale ? 'true' : undefined}>
            {stale && (
              <p className="rounded-lg bg-paper-deep px-3 py-2 text-sm text-ink dark:bg-[#262c3d] dark:text-[#e8e4dc]" data-testid="stale-notice">
                {t.stale(t.submit)}
              </p>
            )}
            {/* Stale: greyed, yet its text keeps 4.5:1 (a fainter fade would make it unreadable). */}
            <div className={`space-y-3 transition ${stale ? 'opacity-80 grayscale' : ''}`}>
              {answer.unusual ? (
                // Values far from all the data: the message leads, the nearest group is only mentioned.
                <div className="space-y-1 rounded-lg border border-saffron-500/60 bg-saffron-100 px-3 py-2 text-ink" data-testid="unusual-notice">
                  <h2 className="font-sans text-base font-bold">{t.unusualHeading}</h2>
                  <p className="text-sm">{t.unusualBody(answer.best.label)}</p>
                </div>
              ) : (
                <>
                  <h2 className="font-sans text-base font-bold text-ink dark:text-[#f3efe7]">
                    {t.mostLike} <span>{answer.best.label}</span>
                    <span className="font-normal"> ({formatPercent(answer.best.probability)})</span>
                  </h2>
                  {answer.best.description && <p className="text-sm text-ink-soft dark:text-[#c9ced8]">{answer.best.description}</p>}
                </>
              )}
              {answer.unused.length > 0 && (
                <p className="text-sm text-ink-soft dark:text-[#c9ced8]" data-testid="unused-fields">
                  {t.notUsed(answer.unused.map(labelOf))}
                </p>
              )}
              <MembershipChart spec={chartSpec} rows={rows} formatPercent={formatPercent} texts={t} locale={sp.locale} />
              {answer.reason && <AnswerReason reason={answer.reason} groups={answer.probabilities} labelOf={labelOf} texts={t.reason} />}
            </div>
          </div>
        )}
      </section>

      <footer id={`${formId}-caution`} className="space-y-2 border-t border-ink/10 pt-3 text-xs text-ink-soft dark:border-white/15 dark:text-[#a9b0bf]">
        {caution && <p className="text-sm text-ink dark:text-[#e8e4dc]">{caution}</p>}
        <p>{t.generalCaution}</p>
        <ReportForm token={token} hostOrigin={hostOrigin} texts={t.report} englishServer={language === 'en'} />
      </footer>
    </div>
  );
}
