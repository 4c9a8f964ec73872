import Link from 'next/link';
import type { InvoiceView } from '@/lib/billing/summary';
import { formatDate as day, formatMoney as euros } from '@/lib/format';

/** An invoice's state in the studio's words (the payment service's codes are not shown). */
export const INVOICE_STATUS_WORDS: Record<string, string> = { paid: 'Settled', open: 'Awaiting payment', void: 'Voided', uncollectible: 'Not collected', draft: 'Draft' };

const STATUS_STYLE: Record<string, string> = {
  paid: 'bg-moss-100 text-moss-900',
  open: 'bg-saffron-100 text-saffron-700',
  void: 'bg-paper-deep text-ink-soft',
  uncollectible: 'bg-clay-100 text-clay-700',
};

export function InvoiceTable({ invoices }: { invoices: InvoiceView[] }) {
  if (invoices.length === 0) return <p className="text-sm text-ink-soft">No invoices yet. They appear here as soon as the payment service confirms a charge.</p>;
  return (
    <table className="w-full text-left text-sm">
      <thead className="border-b border-ink/10 text-ink-soft">
        <tr>
          <th className="py-2 pr-4 font-bold">Invoice</th>
          <th className="py-2 pr-4 font-bold">Period</th>
          <th className="py-2 pr-4 font-bold">Status</th>
          <th className="py-2 pr-4 text-right font-bold">Amount</th>
          <th className="py-2 text-right font-bold">Charged</th>
        </tr>
      </thead>
      <tbody>
        {invoices.map((i) => (
          <tr key={i.id} className="border-b border-ink/5" data-invoice={i.number ?? i.id}>
            <td className="py-2 pr-4 font-bold tabular-nums">
              <Link href={`/studio/billing/invoices/${i.id}`} className="text-moss-700 underline">
                {i.number ?? 'Invoice'}
              </Link>
            </td>
            <td className="py-2 pr-4 text-ink-soft">
              {day(i.periodStart)} – {day(i.periodEnd)}
            </td>
            <td className="py-2 pr-4">
              <span className={`rounded-full px-2.5 py-0.5 text-xs font-bold ${STATUS_STYLE[i.status] ?? 'bg-paper-deep text-ink-soft'}`}>{INVOICE_STATUS_WORDS[i.status] ?? i.status}</span>
            </td>
            <td className="py-2 pr-4 text-right tabular-nums">{euros(i.subtotal ?? i.amountDue, i.currency)}</td>
            <td className="py-2 text-right tabular-nums">
              {i.amountPaid > 0 ? euros(i.amountPaid, i.currency) : <span className="text-ink-soft">No charge</span>}
              {-i.endingBalance > Math.max(0, -i.startingBalance) && <span className="block text-xs font-bold text-moss-700">{euros(-i.endingBalance - Math.max(0, -i.startingBalance), i.currency)} credit added</span>}
              {i.paidAt && <span className="block text-xs text-ink-faint">{day(i.paidAt)}</span>}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
