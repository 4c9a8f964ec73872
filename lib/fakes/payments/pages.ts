import type { CheckoutSession, Invoice, PaymentMethod, PortalSession, Price, Subscription } from './state';

/**
 * HTML pages the fake serves to people: the hosted checkout card form and a plain
 * invoice view. The fake presents itself as "Tally Test Payments", a stand-in that
 * only ever exists on this machine, and says so on every page.
 */
const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export const euros = (cents: number) => `${cents < 0 ? '−' : ''}€${(Math.abs(cents) / 100).toFixed(2)}`;
const day = (seconds: number) => new Date(seconds * 1000).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });

// Tally's own look: one narrow column, a perforated "ticket" for what is being paid,
// warm paper tones and a green action; nothing borrowed from a real hosted checkout.
const STYLE = `
  *{box-sizing:border-box}
  body{margin:0;font:16px/1.5 Georgia,"Iowan Old Style",serif;background:#f3efe6;color:#26231d}
  .strip{background:#2e4a3a;color:#f3efe6;padding:8px 18px;font:13px/1.4 system-ui,sans-serif;text-align:center}
  .mark{display:flex;align-items:center;gap:10px;justify-content:center;margin:28px 0 8px;font:700 15px/1 system-ui,sans-serif;letter-spacing:.08em;text-transform:uppercase;color:#2e4a3a}
  .mark i{display:inline-block;width:18px;height:18px;border-radius:50%;border:3px solid #2e4a3a;border-right-color:transparent}
  main{max-width:520px;margin:0 auto 48px;padding:0 16px}
  .ticket{background:#fffdf8;border:2px dashed #b9ae98;border-radius:4px;padding:18px 20px;margin:16px 0}
  .ticket h1{font-size:22px;margin:0 0 2px;font-weight:600} .ticket .for{font:13px system-ui,sans-serif;color:#6e6657;margin:0}
  .sum{display:flex;justify-content:space-between;gap:12px;padding:6px 0;border-bottom:1px dotted #cfc6b3;font-variant-numeric:tabular-nums}
  .sum:last-child{border-bottom:0} .sum.total{font-weight:700;font-size:18px;padding-top:10px}
  .step{font:700 12px/1 system-ui,sans-serif;letter-spacing:.1em;text-transform:uppercase;color:#8b7f67;margin:26px 0 6px}
  .sheet{background:#fffdf8;border-radius:4px;box-shadow:0 1px 0 #d8cfbd,0 0 0 1px #e5dccb;padding:18px 20px}
  label{display:block;font:600 13px system-ui,sans-serif;margin:12px 0 4px}
  input{width:100%;padding:10px 12px;border:1px solid #b9ae98;border-radius:3px;background:#fff;font:16px system-ui,sans-serif;font-variant-numeric:tabular-nums}
  input:focus{outline:3px solid #8fbf9f;border-color:#2e4a3a}
  .pair{display:grid;grid-template-columns:1fr 1fr;gap:12px}
  button{margin-top:18px;width:100%;padding:13px;border:0;border-radius:999px;background:#3f7a55;color:#fff;font:700 16px system-ui,sans-serif;cursor:pointer}
  button:hover{background:#346748} button.plain{background:transparent;color:#8a3b22;border:1px solid #c99a86}
  .problem{background:#f7e3da;border-left:4px solid #a2442a;color:#6d2513;padding:10px 12px;margin-top:14px;font:14px system-ui,sans-serif}
  .note{font:13px system-ui,sans-serif;color:#6e6657;margin-top:14px} .note code{font-size:13px;background:#efe8da;padding:1px 4px}
  .ok{background:#e4f0e6;border-left:4px solid #3f7a55;padding:10px 12px;margin-top:14px;font:14px system-ui,sans-serif}
  a{color:#2e6a48}
  .back{display:block;text-align:center;margin-top:22px;font:14px system-ui,sans-serif}
`;

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>${esc(title)}</title><style>${STYLE}</style></head><body><div class="strip">Tally Test Payments runs only on this machine: test mode, no real money moves.</div><div class="mark"><i></i>Tally</div>${body}</body></html>`;
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
  <section class="ticket" aria-label="What you pay for">
    <h1>Subscribe to ${esc(item?.productName ?? 'a plan')}</h1>
    <p class="for">for ${esc(v.merchant)} · charged every month until you stop it</p>
    ${v.items.map((i) => `<div class="sum"><span>${esc(i.productName)}${i.quantity > 1 ? ` × ${i.quantity}` : ''}</span><span>${euros(i.price.unit_amount * i.quantity)}</span></div>`).join('')}
    <div class="sum total"><span>Today</span><span>${euros(session.amount_total)}</span></div>
  </section>
  <p class="step">Your card</p>
  <section class="sheet" aria-label="Card">
    <form method="post" action="/pay/${esc(session.id)}" novalidate>
      ${field('number', 'Card number', 'inputmode="numeric" autocomplete="cc-number" placeholder="0000 0000 0000 0000" required')}
      <div class="pair"><div>${field('expiry', 'Expiry (MM / YY)', 'autocomplete="cc-exp" placeholder="MM / YY" required')}</div><div>${field('cvc', 'Security code', 'inputmode="numeric" autocomplete="cc-csc" placeholder="3 digits" required')}</div></div>
      ${field('name', 'Name on card', 'autocomplete="cc-name"')}
      ${v.error ? `<div class="problem" role="alert">${esc(v.error.message)}</div>` : ''}
      <button type="submit">Pay ${euros(session.amount_total)} now, then monthly</button>
    </form>
    <p class="note">Cards for trying it out: <code>4242 4242 4242 4242</code> goes through, <code>4000 0000 0000 0002</code> is refused. Any expiry in the future, any three digits.</p>
  </section>
  ${session.cancel_url ? `<a class="back" href="${esc(session.cancel_url)}">Leave without paying</a>` : ''}
</main>`;
  return page(`Pay ${v.merchant}`, body);
}

export function closedCheckoutPage(session: CheckoutSession): string {
  const text = session.status === 'complete' ? 'This payment went through already.' : 'This payment page has expired. Start again from the site you came from.';
  return page('Payment closed', `<main><section class="ticket"><h1>${text}</h1>${session.status === 'complete' ? `<p><a href="${esc(session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id))}">Back to the site</a></p>` : ''}</section></main>`);
}

export function invoicePage(invoice: Invoice, merchant: string): string {
  const rows = invoice.lines.data.map((l) => `<div class="sum"><span>${esc(l.description)}</span><span>${euros(l.amount)}</span></div>`).join('');
  const credit = invoice.starting_balance ? `<div class="sum"><span>Credit used</span><span>${euros(Math.max(invoice.starting_balance, -invoice.subtotal))}</span></div>` : '';
  const body = `<main><section class="ticket">
  <h1>Invoice ${esc(invoice.number ?? 'preview')}</h1>
  <p class="for">${esc(merchant)} · ${esc(invoice.status)} · issued ${day(invoice.created)}</p>
  ${rows}${credit}
  <div class="sum total"><span>Charged</span><span>${euros(invoice.amount_paid)}</span></div></section></main>`;
  return page(`Invoice ${invoice.number ?? 'preview'}`, body);
}

export function notFoundPage(what: string): string {
  return page('Not found', `<main><section class="ticket"><h1>There is no such ${esc(what)} here.</h1></section></main>`);
}

export interface PortalViewInput {
  session: PortalSession;
  merchant: string;
  card: PaymentMethod | null;
  subscriptions: { sub: Subscription; productName: string }[];
  notice?: { kind: 'ok' | 'error'; text: string };
}

export function portalView(v: PortalViewInput): string {
  const subs = v.subscriptions
    .map(({ sub, productName }) => {
      const price = sub.items.data[0]?.price;
      const stopping = sub.cancel_at_period_end;
      return `<div class="sum"><span><b>${esc(productName)}</b><br><span class="for">${price ? `${euros(price.unit_amount)} a month · ` : ''}${stopping ? `stops on ${day(sub.current_period_end)}` : `next charge on ${day(sub.current_period_end)}`}</span></span></div>
      <form method="post" action="/portal/${esc(v.session.id)}/${stopping ? 'resume' : 'cancel'}"><input type="hidden" name="subscription" value="${esc(sub.id)}"><button type="submit"${stopping ? '' : ' class="plain"'}>${stopping ? 'Keep it running' : `Stop after ${day(sub.current_period_end)}`}</button></form>`;
    })
    .join('');
  const body = `<main>
  <section class="ticket" aria-label="Subscriptions">
    <h1>Your plan with ${esc(v.merchant)}</h1>
    ${v.notice ? `<div class="${v.notice.kind === 'error' ? 'problem' : 'ok'}" role="${v.notice.kind === 'error' ? 'alert' : 'status'}">${esc(v.notice.text)}</div>` : ''}
    ${subs || '<p class="for">Nothing is running.</p>'}
  </section>
  <p class="step">Card we charge</p>
  <section class="sheet" aria-label="Card">
    <p>${v.card ? `Visa ending in <b>${esc(v.card.card.last4)}</b>, expires ${String(v.card.card.exp_month).padStart(2, '0')}/${v.card.card.exp_year}` : 'No card on file.'}</p>
    <form method="post" action="/portal/${esc(v.session.id)}/card" novalidate>
      <label for="number">New card number</label><input id="number" name="number" inputmode="numeric" autocomplete="cc-number" placeholder="0000 0000 0000 0000">
      <div class="pair"><div><label for="expiry">Expiry (MM / YY)</label><input id="expiry" name="expiry" placeholder="MM / YY"></div><div><label for="cvc">Security code</label><input id="cvc" name="cvc" inputmode="numeric" placeholder="3 digits"></div></div>
      <button type="submit">Use this card from now on</button>
    </form>
    <p class="note">Cards for trying it out: <code>4242 4242 4242 4242</code> goes through, <code>4000 0000 0000 0002</code> is refused.</p>
  </section>
  ${v.session.return_url ? `<a class="back" href="${esc(v.session.return_url)}">Return to ${esc(v.merchant)}</a>` : ''}
</main>`;
  return page(`${v.merchant}: your plan`, body);
}
