// The fake's own hosted payment page: a plain form that takes the test cards and nothing else.
import type { FakeSession } from './objects'
import { escapeHtml } from '../../shared/text/html'

/** Minor units as a display amount, with integer arithmetic only. */
export function displayAmount(minor: number, currency: string): string {
  const sign = minor < 0 ? '-' : ''
  const abs = Math.abs(minor)
  const cents = abs % 100
  const whole = String((abs - cents) / 100).replace(/\B(?=(\d{3})+(?!\d))/g, ',')
  const symbol = currency.toLowerCase() === 'usd' ? '$' : `${currency.toUpperCase()} `
  return `${sign}${symbol}${whole}.${String(cents).padStart(2, '0')}`
}

/** Luhn check digit test, as every card number carries one (ISO/IEC 7812-1). */
export function luhnValid(digits: string): boolean {
  if (!/^\d{12,19}$/.test(digits)) return false
  let sum = 0
  for (let i = 0; i < digits.length; i++) {
    let d = Number(digits[digits.length - 1 - i])
    if (i % 2 === 1) {
      d *= 2
      if (d > 9) d -= 9
    }
    sum += d
  }
  return sum % 10 === 0
}

export interface PageState {
  message?: { kind: 'error' | 'info', text: string }
  values?: { email?: string, name?: string }
}

export function paymentPage(session: FakeSession, state: PageState = {}): string {
  const currency = session.currency ?? 'usd'
  const total = displayAmount(session.amount_total ?? 0, currency)
  const open = session.status === 'open'
  const rows = session._lineItems.map(i => `<tr><td>${escapeHtml(i.name)}${i.quantity > 1 ? ` × ${i.quantity}` : ''}</td><td class="num">${displayAmount(i.unitAmount * i.quantity, currency)}</td></tr>`).join('')
  const message = state.message
    ? `<p class="msg ${state.message.kind}" role="alert" data-test="fake-message">${escapeHtml(state.message.text)}</p>`
    : ''
  const form = open
    ? `<form method="post" action="/pay/${escapeHtml(session.id)}" autocomplete="off">
  <label>E-mail<input name="email" type="email" value="${escapeHtml(state.values?.email ?? session.customer_email ?? '')}" required></label>
  <label>Name on card<input name="name" value="${escapeHtml(state.values?.name ?? '')}" required></label>
  <label>Card number<input name="cardNumber" inputmode="numeric" placeholder="4242 4242 4242 4242" required></label>
  <div class="pair">
    <label>Expiry (MM/YY)<input name="expiry" placeholder="12/34" required></label>
    <label>Security code<input name="cvc" inputmode="numeric" placeholder="123" required></label>
  </div>
  <button type="submit" data-test="fake-pay">Pay ${total}</button>
</form>`
    : `<p class="msg info">This payment is ${escapeHtml(session.status ?? 'closed')}.</p>`
  const cancel = session.cancel_url && open ? `<p><a href="${escapeHtml(session.cancel_url)}" data-test="fake-cancel">Cancel and go back</a></p>` : ''
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Test payment · ${total}</title>
<style>
  body { font-family: system-ui, sans-serif; margin: 0; background: whitesmoke; color: black; }
  main { max-width: 28rem; margin: 2rem auto; background: white; border-radius: 12px; padding: 1.5rem 1.75rem; box-shadow: 0 6px 24px rgba(0,0,0,.08); }
  .banner { font-size: .8rem; font-weight: 600; letter-spacing: .02em; background: khaki; padding: .5rem .75rem; border-radius: 6px; }
  h1 { font-size: 1.9rem; margin: 1rem 0 .25rem; }
  table { width: 100%; border-collapse: collapse; margin: .5rem 0 1.25rem; font-size: .95rem; }
  td { padding: .35rem 0; border-bottom: 1px solid gainsboro; } .num { text-align: right; font-variant-numeric: tabular-nums; }
  label { display: block; font-size: .85rem; font-weight: 600; margin: .6rem 0; }
  input { display: block; width: 100%; box-sizing: border-box; margin-top: .25rem; padding: .55rem .6rem; font-size: 1rem; border: 1px solid silver; border-radius: 6px; }
  .pair { display: grid; grid-template-columns: 1fr 1fr; gap: .75rem; }
  button { width: 100%; margin-top: 1rem; padding: .75rem; font-size: 1rem; font-weight: 700; color: white; background: darkslategray; border: 0; border-radius: 8px; cursor: pointer; }
  .msg { padding: .6rem .75rem; border-radius: 6px; font-weight: 600; } .error { background: mistyrose; color: darkred; } .info { background: aliceblue; }
  .cards { font-size: .8rem; color: dimgray; margin-top: 1.25rem; } code { font-size: .85rem; }
</style></head>
<body><main>
<p class="banner">Local test payment page. No real card is charged and no money moves.</p>
<p>Pay Torquewright</p>
<h1 data-test="fake-total">${total}</h1>
<table>${rows}</table>
${message}
${form}
${cancel}
<div class="cards"><p>Test cards (any future expiry, any 3-digit code):</p>
<ul><li><code>4242 4242 4242 4242</code> succeeds</li><li><code>4000 0000 0000 0002</code> is declined</li><li><code>4000 0000 0000 9995</code> is declined for insufficient funds</li></ul></div>
</main></body></html>`
}

/** Checks the card fields the way a payment form does before it sends anything; null when they are fine. */
export function cardProblem(fields: { cardNumber: string, expiry: string, cvc: string, name: string, email: string }, today = new Date()): string | null {
  if (!fields.email.includes('@')) return 'Enter the e-mail address the receipt goes to.'
  if (!fields.name.trim()) return 'Enter the name on the card.'
  const digits = fields.cardNumber.replace(/[\s-]/g, '')
  if (!luhnValid(digits)) return 'Your card number is incomplete or invalid.'
  const m = fields.expiry.trim().match(/^(\d{1,2})\s*\/\s*(\d{2})$/)
  if (!m) return 'Enter the expiry date as MM/YY.'
  const month = Number(m[1])
  const year = 2000 + Number(m[2])
  if (month < 1 || month > 12) return 'The expiry month is between 01 and 12.'
  if (year < today.getUTCFullYear() || (year === today.getUTCFullYear() && month < today.getUTCMonth() + 1)) return 'Your card\'s expiry date is in the past.'
  if (!/^\d{3,4}$/.test(fields.cvc.trim())) return 'Your card\'s security code is 3 or 4 digits.'
  return null
}
