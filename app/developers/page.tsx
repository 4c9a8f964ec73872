import type { Metadata } from 'next';
import Link from 'next/link';
import type { ReactNode } from 'react';
import { SiteHeader } from '@/components/brand/SiteHeader';
import { openApiDocument } from '@/lib/api/openapi/registry';
import { componentFields, referenceOf, type FieldRow, type OperationView } from '@/lib/api/openapi/reference';
import { API_KEY_SCOPES, SCOPE_WORDS } from '@/lib/auth/api-key-schemas';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'API reference', description: 'The Partwise REST API: upload, fit, publish and read usage from your own scripts.' };

const METHOD_TONE: Record<string, string> = {
  GET: 'bg-moss-100 text-moss-900',
  POST: 'bg-saffron-100 text-saffron-700',
  PUT: 'bg-paper-deep text-ink',
  PATCH: 'bg-paper-deep text-ink',
  DELETE: 'bg-clay-100 text-clay-700',
};

/** One line of the document's words, with its `code` spans. */
function Inline({ text }: { text: string }) {
  return (
    <>
      {text.split(/`([^`]+)`/).map((part, j) =>
        j % 2 ? (
          <code key={j} className="rounded bg-paper-deep px-1 py-0.5 font-mono text-[0.8rem] text-ink">
            {part}
          </code>
        ) : (
          part
        ),
      )}
    </>
  );
}

/** `code` spans and paragraphs of the document's descriptions. */
function Words({ text }: { text: string }) {
  return (
    <>
      {text
        .split(/\n\n+/)
        .filter(Boolean)
        .map((para, i) => (
          <p key={i} className="mt-2 text-sm text-ink-soft">
            <Inline text={para} />
          </p>
        ))}
    </>
  );
}

function FieldTable({ caption, rows, extra }: { caption: string; rows: (FieldRow & { in?: string })[]; extra?: ReactNode }) {
  if (rows.length === 0) return null;
  return (
    <div className="mt-4 overflow-x-auto">
      <table className="w-full min-w-[560px] text-left text-sm">
        <caption className="pb-2 text-left text-xs font-bold uppercase tracking-wide text-ink-faint">
          {caption} {extra}
        </caption>
        <thead className="border-b border-ink/10 text-ink-faint">
          <tr>
            <th className="py-1.5 pr-3 font-bold">Field</th>
            <th className="py-1.5 pr-3 font-bold">Type</th>
            <th className="py-1.5 font-bold">Rules</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((f) => (
            <tr key={`${f.in ?? ''}${f.name}`} className="border-b border-ink/5 align-top last:border-0">
              <td className="py-2 pr-3">
                <code className="font-mono text-[0.8rem] font-bold text-ink">{f.name}</code>
                {f.in ? <span className="ml-1 text-xs text-ink-faint">({f.in})</span> : null}
                {f.required ? <span className="ml-2 rounded-full bg-clay-100 px-1.5 py-0.5 text-[0.7rem] font-bold text-clay-700">required</span> : null}
              </td>
              <td className="py-2 pr-3 font-mono text-[0.8rem] text-ink-soft">{f.type}</td>
              <td className="py-2 text-ink-soft">
                {f.constraints.length ? f.constraints.join(' · ') : '—'}
                {f.description ? <div className="text-xs text-ink-faint">{f.description}</div> : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Operation({ op }: { op: OperationView }) {
  return (
    <article id={op.id} className="pw-card scroll-mt-6 p-6" aria-labelledby={`${op.id}-title`}>
      <div className="flex flex-wrap items-center gap-3">
        <span className={`rounded-full px-2.5 py-0.5 font-mono text-xs font-bold ${METHOD_TONE[op.method] ?? 'bg-paper-deep'}`}>{op.method}</span>
        <code className="break-all font-mono text-sm font-bold text-ink">{op.path}</code>
        {op.scope ? (
          <span className="ml-auto rounded-full px-2.5 py-0.5 text-xs font-bold text-moss-700 ring-1 ring-moss-300">scope: {op.scope}</span>
        ) : (
          <span className="ml-auto rounded-full px-2.5 py-0.5 text-xs font-bold text-ink-soft ring-1 ring-ink/15">public, no key</span>
        )}
      </div>
      <h3 id={`${op.id}-title`} className="mt-3 text-lg font-bold">
        {op.summary}
      </h3>
      <Words text={op.description} />
      <FieldTable caption="Address and query" rows={op.parameters} />
      {op.body ? (
        op.body.fields.length ? (
          <FieldTable caption="Body" rows={op.body.fields} extra={<span className="font-normal normal-case">({op.body.mediaType}{op.body.strict ? '; other fields are refused' : ''})</span>} />
        ) : (
          <p className="mt-4 text-sm text-ink-soft">
            <span className="text-xs font-bold uppercase tracking-wide text-ink-faint">Body</span> — the raw <code className="font-mono text-[0.8rem]">{op.body.mediaType}</code> content.
          </p>
        )
      ) : null}
      <div className="mt-4">
        <p className="pb-1 text-xs font-bold uppercase tracking-wide text-ink-faint">Answers</p>
        <ul className="grid gap-1 text-sm">
          {op.responses.map((r) => (
            <li key={r.status} className="flex gap-3">
              <span className={`w-10 shrink-0 font-mono font-bold ${r.status.startsWith('2') ? 'text-moss-700' : 'text-clay-700'}`}>{r.status}</span>
              <span className="text-ink-soft">
                <Inline text={r.description} />
                {r.schema && r.status.startsWith('2') ? <code className="ml-2 font-mono text-[0.8rem] text-ink">{r.schema}</code> : null}
              </span>
            </li>
          ))}
        </ul>
      </div>
    </article>
  );
}

const OBJECTS = ['Dataset', 'Fit', 'Ranking', 'Model', 'Calculator', 'Version', 'Usage', 'ScoreAnswer', 'Error'];

export default function DevelopersPage() {
  const doc = openApiDocument() as unknown as Record<string, unknown>;
  const tags = referenceOf(doc);
  return (
    <>
      <SiteHeader />
      <main className="mx-auto grid max-w-6xl gap-10 px-6 pb-20 pt-6 lg:grid-cols-[14rem_1fr]">
        <nav aria-label="API reference" className="text-sm lg:sticky lg:top-6 lg:self-start">
          <p className="font-bold text-ink">On this page</p>
          <ul className="mt-2 grid gap-1">
            <li>
              <a href="#authenticate" className="text-moss-700 hover:underline">Authenticate</a>
            </li>
            {tags.map((t) => (
              <li key={t.name}>
                <a href={`#tag-${t.name.toLowerCase()}`} className="text-moss-700 hover:underline">
                  {t.name}
                </a>
              </li>
            ))}
            <li>
              <a href="#objects" className="text-moss-700 hover:underline">What comes back</a>
            </li>
          </ul>
        </nav>
        <div className="min-w-0 space-y-12">
          <header>
            <p className="mb-3 inline-block rounded-full bg-saffron-100 px-3 py-1 text-sm font-bold text-saffron-700">API reference · v{(doc.info as { version: string }).version}</p>
            <h1 className="text-4xl font-bold leading-tight">Run the studio from your own scripts</h1>
            <p className="mt-4 max-w-2xl text-lg text-ink-soft">
              Everything a nightly job needs: upload the new table, fit, read the ranking, keep a model, name its groups, publish a version and serve it. The same
              checks as the studio apply, including your plan&apos;s limits. This page is drawn from the{' '}
              <a href="/api/openapi.json" className="font-bold text-moss-700 hover:underline">
                OpenAPI 3.1 document
              </a>
              , which your tools can read too.
            </p>
          </header>

          <section id="authenticate" aria-labelledby="authenticate-title" className="pw-card scroll-mt-6 p-6">
            <h2 id="authenticate-title" className="text-2xl font-bold">
              Authenticate
            </h2>
            <p className="mt-2 text-sm text-ink-soft">
              A workspace owner makes a key under{' '}
              <Link href="/studio/api-keys" className="font-bold text-moss-700 hover:underline">
                Studio → API keys
              </Link>
              , with a name, the scopes it may use and, if you like, an expiry. The key is shown once; Partwise keeps only a fingerprint. Send it on every call:
            </p>
            <pre className="mt-3 overflow-x-auto rounded-lg bg-ink px-4 py-3 font-mono text-sm text-paper">
              <code>{'curl -H "Authorization: Bearer $PARTWISE_API_KEY" https://your-partwise.example/api/v1/usage'}</code>
            </pre>
            <p className="mt-3 text-sm text-ink-soft">
              Keys work only in that header: a browser session does not open these routes, and a key never opens the studio. A key acts for its own workspace; ids of
              other workspaces are simply not found. Every call is written to the workspace&apos;s audit trail.
            </p>
            <table className="mt-4 w-full text-left text-sm">
              <caption className="pb-2 text-left text-xs font-bold uppercase tracking-wide text-ink-faint">Scopes</caption>
              <tbody>
                {API_KEY_SCOPES.map((s) => (
                  <tr key={s} className="border-b border-ink/5 last:border-0">
                    <td className="py-1.5 pr-4 font-mono font-bold">{s}</td>
                    <td className="py-1.5 text-ink-soft">{SCOPE_WORDS[s]}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-4 text-sm text-ink-soft">
              Refusals are JSON: <code className="font-mono text-[0.8rem]">{'{ "error": { "code", "message", "issues": [{ "field", "message" }] } }'}</code>. 401 means no usable key (missing,
              unknown, revoked or expired: the message says which), 403 a missing scope, 404 nothing by that id in your workspace, 422 bad input with each field named
              (nothing is written), 402 a plan limit, 429 too many at once.
            </p>
          </section>

          {tags.map((t) => (
            <section key={t.name} id={`tag-${t.name.toLowerCase()}`} aria-labelledby={`tag-${t.name.toLowerCase()}-title`} className="scroll-mt-6 space-y-4">
              <div>
                <h2 id={`tag-${t.name.toLowerCase()}-title`} className="text-2xl font-bold">
                  {t.name}
                </h2>
                <p className="mt-1 text-ink-soft">{t.description}</p>
              </div>
              {t.operations.map((op) => (
                <Operation key={op.id} op={op} />
              ))}
            </section>
          ))}

          <section id="objects" aria-labelledby="objects-title" className="scroll-mt-6 space-y-4">
            <h2 id="objects-title" className="text-2xl font-bold">
              What comes back
            </h2>
            {OBJECTS.map((name) => (
              <div key={name} className="pw-card p-6">
                <h3 className="font-mono text-lg font-bold">{name}</h3>
                <FieldTable caption="Fields" rows={componentFields(doc, name)} />
              </div>
            ))}
          </section>
        </div>
      </main>
      <footer className="border-t border-ink/10 py-8 text-center text-sm text-ink-faint">Partwise · Gaussian mixtures for people who measure things</footer>
    </>
  );
}
