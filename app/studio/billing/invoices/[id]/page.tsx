import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { pageWorkspace } from '@/lib/auth/page';
import { findInvoice } from '@/lib/billing/summary';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { INVOICE_STATUS_WORDS } from '@/components/billing/InvoiceTable';
import { PrintButton } from '@/components/billing/PrintButton';
import { formatDate as day, formatMoney as euros } from '@/lib/format';

export const metadata: Metadata = { title: 'Invoice' };
export const dynamic = 'force-dynamic';

/** One invoice with its lines, laid out to print (the studio's chrome is hidden on paper). */
export default async function InvoicePage({ params }: { params: Promise<{ id: string }> }) {
  // A member is sent back to the studio with the owners-only notice (lib/auth/page.ts).
  const actor = await pageWorkspace('owner', '/studio/billing');
  const { id } = await params;
  const invoiceId = parseDecimalId(id) ?? notFound();
  let invoice;
  try {
    invoice = await findInvoice(actor.workspace.id, invoiceId);
  } catch (e) {
    if (e instanceof AppError && e.code === 'not_found') notFound();
    throw e;
  }
  const money = (cents: number) => euros(cents, invoice.currency);
  const title = invoice.number ? `Invoice ${invoice.number}` : 'Invoice';
  return (
    <article className="mx-auto max-w-3xl rounded-card bg-white p-8 ring-1 ring-ink/10 print:max-w-none print:p-0 print:ring-0" data-testid="invoice">
      <div className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <p className="text-sm font-bold uppercase tracking-wide text-ink-soft">Partwise</p>
          <h1 className="mt-1 text-3xl font-semibold">{title}</h1>
          <p className="mt-1 text-ink-soft">
            For {actor.workspace.name} · {day(invoice.periodStart)} to {day(invoice.periodEnd)}
          </p>
        </div>
        <div className="flex gap-2 print:hidden">
          <Link href="/studio/billing#invoices" className="pw-button-quiet">
            Back to billing
          </Link>
          <PrintButton />
        </div>
      </div>

      <dl className="mt-6 grid grid-cols-2 gap-x-6 gap-y-2 text-sm sm:grid-cols-3">
        <div>
          <dt className="text-ink-soft">Status</dt>
          <dd className="font-bold">{INVOICE_STATUS_WORDS[invoice.status] ?? invoice.status}</dd>
        </div>
        <div>
          <dt className="text-ink-soft">Issued</dt>
          <dd className="font-bold">{day(invoice.createdAt)}</dd>
        </div>
        <div>
          <dt className="text-ink-soft">Settled</dt>
          <dd className="font-bold">{invoice.paidAt ? day(invoice.paidAt) : '—'}</dd>
        </div>
      </dl>

      <table className="mt-8 w-full text-left text-sm">
        <caption className="sr-only">Invoice lines</caption>
        <thead className="border-b border-ink/20 text-ink-soft">
          <tr>
            <th scope="col" className="py-2 pr-4 font-bold">Description</th>
            <th scope="col" className="py-2 pr-4 font-bold">Period</th>
            <th scope="col" className="py-2 text-right font-bold">Amount</th>
          </tr>
        </thead>
        <tbody>
          {invoice.lines.map((l, i) => (
            <tr key={i} className="border-b border-ink/5">
              <td className="py-2 pr-4">{l.description}</td>
              <td className="py-2 pr-4 text-ink-soft">{l.periodStart ? `${day(l.periodStart)} – ${day(l.periodEnd)}` : '—'}</td>
              <td className="py-2 text-right tabular-nums">{money(l.amount)}</td>
            </tr>
          ))}
          {invoice.lines.length === 0 && (
            <tr>
              <td colSpan={3} className="py-2 text-ink-soft">
                The payment service sent no itemised lines for this invoice.
              </td>
            </tr>
          )}
        </tbody>
        <tfoot className="text-sm">
          <tr>
            <th scope="row" colSpan={2} className="pt-3 pr-4 text-right font-normal text-ink-soft">Subtotal</th>
            <td className="pt-3 text-right tabular-nums">{money(invoice.subtotal ?? invoice.amountDue)}</td>
          </tr>
          {invoice.creditUsed > 0 && (
            <tr>
              <th scope="row" colSpan={2} className="pr-4 text-right font-normal text-ink-soft">Credit on account used</th>
              <td className="text-right tabular-nums">{money(-invoice.creditUsed)}</td>
            </tr>
          )}
          <tr>
            <th scope="row" colSpan={2} className="pt-2 pr-4 text-right font-bold">Charged to the card</th>
            <td className="pt-2 text-right text-lg font-bold tabular-nums" data-testid="invoice-charged">{money(invoice.amountPaid)}</td>
          </tr>
          {invoice.creditAdded > 0 && (
            <tr>
              <th scope="row" colSpan={2} className="pr-4 text-right font-bold text-moss-700">Credit added to your account</th>
              <td className="text-right font-bold tabular-nums text-moss-700" data-testid="invoice-credit">{money(invoice.creditAdded)}</td>
            </tr>
          )}
        </tfoot>
      </table>
      <p className="mt-8 text-xs text-ink-faint">Amounts in {invoice.currency.toUpperCase()}. Credit on account is used first on later invoices.</p>
    </article>
  );
}
