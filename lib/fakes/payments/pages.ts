import type { CheckoutSession, Invoice, PaymentMethod, PortalSession, Price, Subscription } from './state';

/**
 * HTML pages the fake serves to people: the hosted checkout card form and a plain
 * invoice view. The fake presents itself as "Tally Test Payments", a stand-in that
 * only ever exists on this machine, and says so on every page.
 */
const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export const euros = (cents: number) => `€${(cents / 100).toFixed(2)}`;

const STYLE = `
  *{box-sizing:border-box}
  body{margin:0;font:15px/1.45 system-ui,-apple-system,"Segoe UI",sans-serif;background:#eef1f4;color:#1c2430}
  .bar{background:#1f3a5f;color:#fff;padding:10px 20px;font-size:13px;letter-spacing:.02em;display:flex;justify-content:space-between}
  .bar b{font-weight:650}
  main{max-width:880px;margin:32px auto;padding:0 16px;display:grid;grid-template-columns:1fr 1.1fr;gap:24px}
  @media (max-width:720px){main{grid-template-columns:1fr}}
  .panel{background:#fff;border:1px solid #d6dde5;border-radius:10px;padding:24px}
  h1{font-size:20px;margin:0 0 4px} h2{font-size:15px;margin:0 0 12px;color:#4a5a6c;font-weight:600}
  .amount{font-size:30px;font-weight:700;margin:12px 0 2px} .muted{color:#5d6b7a;font-size:13px}
  label{display:block;font-size:13px;font-weight:600;margin:14px 0 4px}
  input{width:100%;padding:10px 12px;border:1px solid #b9c4cf;border-radius:6px;font:inherit;font-variant-numeric:tabular-nums}
  input:focus{outline:2px solid #3b74c4;border-color:#3b74c4}
  .row{display:grid;grid-template-columns:1fr 1fr;gap:12px}
  button{margin-top:20px;width:100%;padding:12px;border:0;border-radius:6px;background:#1f3a5f;color:#fff;font:inherit;font-weight:650;cursor:pointer}
  button:hover{background:#284b7a}
  .error{background:#fdecea;border:1px solid #e2a39b;color:#8a2318;padding:10px 12px;border-radius:6px;margin-top:14px}
  .hint{background:#f4f7fa;border:1px dashed #aab7c4;border-radius:6px;padding:10px 12px;margin-top:18px;font-size:13px}
  .hint code{font-size:13px}
  table{width:100%;border-collapse:collapse;margin-top:12px} td{padding:6px 0;border-bottom:1px solid #e6ebf0} td.n{text-align:right;font-variant-numeric:tabular-nums}
  a{color:#1f5fae}
`;

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>${esc(title)}</title><style>${STYLE}</style></head><body><div class="bar"><span><b>Tally Test Payments</b> · a local stand-in for the payment service</span><span>test mode — no real money moves</span></div>${body}</body></html>`;
}

export interface CheckoutView {
  session: CheckoutSession;
  items: { price: Price; quantity: number; productName: string }[];
  merchant: string;
  error?: { message: string; field?: string };
  values?: { number?: string; expiry?: string; cvc?: string; name?: string };
}

export function checkoutPage(v: CheckoutView): string {
  const { session } = v;
  const item = v.items[0];
  const field = (name: string, label: string, attrs: string) =>
    `<label for="${name}">${label}</label><input id="${name}" name="${name}" ${attrs} value="${esc(v.values?.[name as keyof NonNullable<CheckoutView['values']>] ?? '')}"${v.error?.field === name ? ' aria-invalid="true"' : ''}>`;
  const body = `<main>
  <section class="panel" aria-label="Order">
    <h2>${esc(v.merchant)}</h2>
    <h1>Subscribe to ${esc(item?.productName ?? 'a plan')}</h1>
    <div class="amount">${euros(session.amount_total)}</div>
    <div class="muted">per month, renews monthly until cancelled</div>
    <table>${v.items.map((i) => `<tr><td>${esc(i.productName)} × ${i.quantity}</td><td class="n">${euros(i.price.unit_amount * i.quantity)}</td></tr>`).join('')}
    <tr><td><b>Due today</b></td><td class="n"><b>${euros(session.amount_total)}</b></td></tr></table>
    ${session.cancel_url ? `<p class="muted" style="margin-top:18px"><a href="${esc(session.cancel_url)}">← Back without paying</a></p>` : ''}
  </section>
  <section class="panel" aria-label="Card">
    <h2>Pay by card</h2>
    <form method="post" action="/pay/${esc(session.id)}" novalidate>
      ${field('number', 'Card number', 'inputmode="numeric" autocomplete="cc-number" placeholder="1234 1234 1234 1234" required')}
      <div class="row"><div>${field('expiry', 'Expiry (MM / YY)', 'autocomplete="cc-exp" placeholder="MM / YY" required')}</div><div>${field('cvc', 'Security code', 'inputmode="numeric" autocomplete="cc-csc" placeholder="123" required')}</div></div>
      ${field('name', 'Name on card', 'autocomplete="cc-name"')}
      ${v.error ? `<div class="error" role="alert">${esc(v.error.message)}</div>` : ''}
      <button type="submit">Pay ${euros(session.amount_total)} and subscribe</button>
    </form>
    <div class="hint">Test cards: <code>4242 4242 4242 4242</code> is accepted, <code>4000 0000 0000 0002</code> is declined. Any future expiry and any 3 digits.</div>
  </section>
</main>`;
  return page(`Pay ${v.merchant}`, body);
}

export function closedCheckoutPage(session: CheckoutSession): string {
  const text = session.status === 'complete' ? 'This checkout has been paid already.' : 'This checkout has expired. Start again from the site you came from.';
  return page('Checkout closed', `<main style="grid-template-columns:1fr"><section class="panel"><h1>${text}</h1>${session.status === 'complete' ? `<p><a href="${esc(session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id))}">Return to the site</a></p>` : ''}</section></main>`);
}

export function invoicePage(invoice: Invoice, merchant: string): string {
  const rows = invoice.lines.data.map((l) => `<tr><td>${esc(l.description)}</td><td class="n">${euros(l.amount)}</td></tr>`).join('');
  const body = `<main style="grid-template-columns:1fr"><section class="panel">
  <h2>${esc(merchant)}</h2><h1>Invoice ${esc(invoice.number ?? "preview")}</h1>
  <p class="muted">Status: ${esc(invoice.status)} · issued ${new Date(invoice.created * 1000).toISOString().slice(0, 10)}</p>
  <table>${rows}
  ${invoice.starting_balance ? `<tr><td>Credit applied</td><td class="n">${euros(Math.max(invoice.starting_balance, -invoice.subtotal))}</td></tr>` : ''}
  <tr><td><b>Paid</b></td><td class="n"><b>${euros(invoice.amount_paid)}</b></td></tr></table></section></main>`;
  return page(`Invoice ${invoice.number}`, body);
}

export function notFoundPage(what: string): string {
  return page('Not found', `<main style="grid-template-columns:1fr"><section class="panel"><h1>No such ${esc(what)}.</h1></section></main>`);
}

export interface PortalViewInput {
  session: PortalSession;
  merchant: string;
  card: PaymentMethod | null;
  subscriptions: { sub: Subscription; productName: string }[];
  notice?: { kind: 'ok' | 'error'; text: string };
}

export function portalView(v: PortalViewInput): string {
  const date = (s: number) => new Date(s * 1000).toISOString().slice(0, 10);
  const subs = v.subscriptions
    .map(({ sub, productName }) => {
      const price = sub.items.data[0]?.price;
      const action = sub.cancel_at_period_end ? 'resume' : 'cancel';
      return `<tr><td><b>${esc(productName)}</b><br><span class="muted">${price ? euros(price.unit_amount) : ''} a month · ${sub.cancel_at_period_end ? `ends ${date(sub.current_period_end)}` : `renews ${date(sub.current_period_end)}`}</span></td>
      <td class="n"><form method="post" action="/portal/${esc(v.session.id)}/${action}"><input type="hidden" name="subscription" value="${esc(sub.id)}"><button type="submit" style="margin:0;width:auto;white-space:nowrap;padding:8px 14px;${action === 'cancel' ? 'background:#fff;color:#8a2318;border:1px solid #e2a39b' : ''}">${action === 'cancel' ? 'End at period end' : 'Keep subscription'}</button></form></td></tr>`;
    })
    .join('');
  const body = `<main>
  <section class="panel" aria-label="Subscriptions">
    <h2>${esc(v.merchant)}</h2><h1>Your subscription</h1>
    ${v.notice ? `<div class="${v.notice.kind === 'error' ? 'error' : 'hint'}" role="${v.notice.kind === 'error' ? 'alert' : 'status'}">${esc(v.notice.text)}</div>` : ''}
    <table>${subs || '<tr><td class="muted">No active subscription.</td></tr>'}</table>
    ${v.session.return_url ? `<p style="margin-top:18px"><a href="${esc(v.session.return_url)}">← Return to ${esc(v.merchant)}</a></p>` : ''}
  </section>
  <section class="panel" aria-label="Card">
    <h2>Card on file</h2>
    <p>${v.card ? `Visa ending in <b>${esc(v.card.card.last4)}</b>, expires ${String(v.card.card.exp_month).padStart(2, '0')}/${v.card.card.exp_year}` : 'No card on file.'}</p>
    <form method="post" action="/portal/${esc(v.session.id)}/card" novalidate>
      <label for="number">New card number</label><input id="number" name="number" inputmode="numeric" autocomplete="cc-number" placeholder="1234 1234 1234 1234">
      <div class="row"><div><label for="expiry">Expiry (MM / YY)</label><input id="expiry" name="expiry" placeholder="MM / YY"></div><div><label for="cvc">Security code</label><input id="cvc" name="cvc" inputmode="numeric" placeholder="123"></div></div>
      <button type="submit">Save this card</button>
    </form>
    <div class="hint">Test cards: <code>4242 4242 4242 4242</code> is accepted, <code>4000 0000 0000 0002</code> is declined.</div>
  </section>
</main>`;
  return page(`${v.merchant} — your subscription`, body);
}
