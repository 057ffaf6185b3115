import { createHash, randomBytes } from 'node:crypto';

/**
 * The stand-in's records and the shapes it answers with. Each view returns every field the
 * pinned API version sends for the resource (stripe-node's types, non-optional fields, and
 * Stripe's published example objects in ../shared/reference/stripe-openapi-fixtures3.json),
 * with expandable fields as ids until `expand[]` asks for them. Fields Stripe leaves out
 * unless expanded (Charge.refunds since API version 2022-11-15) are left out here too.
 * tests/api/stripe-contract.test.ts checks every view against both sources.
 */

export type Obj = Record<string, unknown>;

export const newId = (prefix: string) => `${prefix}_test_${randomBytes(12).toString('hex')}`;
export const now = () => Math.floor(Date.now() / 1000);

/** What a test card number does, as in Stripe's testing docs (numbers from memory of those docs). */
export type CardBehaviour = 'succeeds' | 'declined' | 'refund_fails' | 'refund_pending';
export const TEST_CARDS: Record<string, { behaviour: CardBehaviour; label: string }> = {
  '4242424242424242': { behaviour: 'succeeds', label: 'pays' },
  '4000000000000002': { behaviour: 'declined', label: 'is declined' },
  '4000000000005126': { behaviour: 'refund_fails', label: 'pays; a refund of it fails a moment later' },
  '4000000000007726': { behaviour: 'refund_pending', label: 'pays; a refund of it is pending a moment, then succeeds' },
};

export interface SessionRec {
  id: string;
  created: number;
  expiresAt: number;
  status: 'open' | 'complete' | 'expired';
  paymentStatus: 'unpaid' | 'paid';
  amount: number;
  currency: string;
  customerEmail: string | null;
  clientReferenceId: string | null;
  metadata: Record<string, string>;
  successUrl: string;
  cancelUrl: string;
  paymentIntent: string | null;
  productName: string;
  productDescription: string;
  intentMetadata: Record<string, string>;
  intentDescription: string | null;
}

export interface IntentRec {
  id: string;
  created: number;
  amount: number;
  amountReceived: number;
  currency: string;
  status: 'requires_payment_method' | 'succeeded';
  metadata: Record<string, string>;
  description: string | null;
  latestCharge: string | null;
  paymentMethod: string | null;
  lastError: Obj | null;
  clientSecret: string;
}

export interface ChargeRec {
  id: string;
  created: number;
  amount: number;
  amountRefunded: number;
  currency: string;
  paymentIntent: string;
  metadata: Record<string, string>;
  description: string | null;
  status: 'succeeded' | 'failed';
  paymentMethod: string;
  last4: string;
  fingerprint: string;
  email: string | null;
  behaviour: CardBehaviour;
  balanceTransaction: string | null;
}

export interface RefundRec {
  id: string;
  created: number;
  amount: number;
  currency: string;
  charge: string;
  paymentIntent: string;
  paymentMethod: string;
  metadata: Record<string, string>;
  reason: string | null;
  status: 'pending' | 'succeeded' | 'failed';
  failureReason: string | null;
  failureBalanceTransaction: string | null;
  balanceTransaction: string;
  /** A refund soon after the charge reaches the card as a reversal; later ones as a refund. */
  destination: 'refund' | 'reversal';
}

export interface Store {
  sessions: Map<string, SessionRec>;
  intents: Map<string, IntentRec>;
  charges: Map<string, ChargeRec>;
  refunds: Map<string, RefundRec>;
  publicUrl: string;
}

const nullAddress = () => ({ city: null, country: null, line1: null, line2: null, postal_code: null, state: null });

export function sessionView(s: SessionRec, st: Store): Obj {
  const complete = s.status === 'complete';
  return {
    id: s.id,
    object: 'checkout.session',
    adaptive_pricing: { enabled: false },
    after_expiration: null,
    allow_promotion_codes: null,
    allowed_payment_method_types: null,
    amount_subtotal: s.amount,
    amount_total: s.amount,
    automatic_tax: { enabled: false, liability: null, provider: null, status: null },
    billing_address_collection: null,
    cancel_url: s.cancelUrl,
    client_reference_id: s.clientReferenceId,
    client_secret: null,
    collected_information: complete ? { business_name: null, individual_name: null, shipping_details: null } : null,
    consent: null,
    consent_collection: null,
    created: s.created,
    currency: s.currency,
    currency_conversion: null,
    custom_fields: [],
    custom_text: { after_submit: null, shipping_address: null, submit: null, terms_of_service_acceptance: null },
    customer: null,
    customer_account: null,
    customer_creation: 'if_required',
    customer_details: complete || s.customerEmail
      ? { address: complete ? { ...nullAddress(), country: 'US', postal_code: '42424' } : null, business_name: null, email: s.customerEmail, individual_name: null, name: null, phone: null, tax_exempt: 'none', tax_ids: complete ? [] : null }
      : null,
    customer_email: s.customerEmail,
    discounts: [],
    expires_at: s.expiresAt,
    integration_identifier: null,
    invoice: null,
    invoice_creation: { enabled: false, invoice_data: { account_tax_ids: null, custom_fields: null, description: null, footer: null, issuer: null, metadata: {}, rendering_options: null } },
    livemode: false,
    locale: null,
    managed_payments: null,
    metadata: { ...s.metadata },
    mode: 'payment',
    origin_context: null,
    payment_intent: s.paymentIntent,
    payment_link: null,
    payment_method_collection: 'if_required',
    payment_method_configuration_details: null,
    payment_method_options: { card: { request_three_d_secure: 'automatic' } },
    payment_method_types: ['card'],
    payment_status: s.paymentStatus,
    permissions: null,
    phone_number_collection: { enabled: false },
    recovered_from: null,
    saved_payment_method_options: null,
    setup_intent: null,
    shipping_address_collection: null,
    shipping_cost: null,
    shipping_options: [],
    status: s.status,
    submit_type: null,
    subscription: null,
    success_url: s.successUrl,
    total_details: { amount_discount: 0, amount_shipping: 0, amount_tax: 0 },
    ui_mode: 'hosted_page',
    url: s.status === 'open' ? `${st.publicUrl}/checkout/${s.id}` : null,
    wallet_options: null,
  };
}

export function intentView(pi: IntentRec): Obj {
  return {
    id: pi.id,
    object: 'payment_intent',
    allowed_payment_method_types: null,
    amount: pi.amount,
    amount_capturable: 0,
    amount_details: { tip: {} },
    amount_received: pi.amountReceived,
    application: null,
    application_fee_amount: null,
    automatic_payment_methods: null,
    canceled_at: null,
    cancellation_reason: null,
    capture_method: 'automatic_async',
    client_secret: pi.clientSecret,
    confirmation_method: 'automatic',
    created: pi.created,
    currency: pi.currency,
    customer: null,
    customer_account: null,
    description: pi.description,
    excluded_payment_method_types: null,
    last_payment_error: pi.lastError ? { ...pi.lastError } : null,
    latest_charge: pi.latestCharge,
    livemode: false,
    managed_payments: null,
    metadata: { ...pi.metadata },
    next_action: null,
    on_behalf_of: null,
    payment_method: pi.paymentMethod,
    payment_method_configuration_details: null,
    payment_method_options: { card: { installments: null, mandate_options: null, network: null, request_three_d_secure: 'automatic' } },
    payment_method_types: ['card'],
    payment_record: null,
    processing: null,
    receipt_email: null,
    review: null,
    setup_future_usage: null,
    shipping: null,
    source: null,
    statement_descriptor: null,
    statement_descriptor_suffix: null,
    status: pi.status,
    transfer_group: null,
  };
}

export function chargeView(ch: ChargeRec, st: Store): Obj {
  const ok = ch.status === 'succeeded';
  return {
    id: ch.id,
    object: 'charge',
    amount: ch.amount,
    amount_captured: ok ? ch.amount : 0,
    amount_refunded: ch.amountRefunded,
    application: null,
    application_fee: null,
    application_fee_amount: null,
    balance_transaction: ch.balanceTransaction,
    billing_details: { address: { ...nullAddress(), country: 'US', postal_code: '42424' }, email: ch.email, name: null, phone: null, tax_id: null },
    calculated_statement_descriptor: 'TALLYPOST STAND-IN',
    captured: ok,
    created: ch.created,
    currency: ch.currency,
    customer: null,
    description: ch.description,
    disputed: false,
    failure_balance_transaction: null,
    failure_code: ok ? null : 'card_declined',
    failure_message: ok ? null : 'Your card was declined.',
    fraud_details: {},
    livemode: false,
    metadata: { ...ch.metadata },
    on_behalf_of: null,
    outcome: ok
      ? { advice_code: null, network_advice_code: null, network_decline_code: null, network_status: 'approved_by_network', reason: null, risk_level: 'normal', risk_score: 21, seller_message: 'Payment complete.', type: 'authorized' }
      : { advice_code: 'try_again_later', network_advice_code: null, network_decline_code: null, network_status: 'declined_by_network', reason: 'generic_decline', risk_level: 'normal', risk_score: 21, seller_message: 'The bank did not return any further details with this decline.', type: 'issuer_declined' },
    paid: ok,
    payment_intent: ch.paymentIntent,
    payment_method: ch.paymentMethod,
    payment_method_details: {
      card: {
        amount_authorized: ok ? ch.amount : null,
        authorization_code: ok ? String(100000 + (parseInt(ch.id.slice(-5), 16) % 900000)) : null,
        brand: 'visa',
        checks: { address_line1_check: null, address_postal_code_check: 'pass', cvc_check: 'pass' },
        country: 'US',
        electronic_commerce_indicator: null,
        exp_month: 12,
        exp_year: new Date().getUTCFullYear() + 3,
        funding: 'credit',
        installments: null,
        last4: ch.last4,
        mandate: null,
        network: 'visa',
        network_transaction_id: ok ? createHash('sha256').update(ch.id).digest('hex').slice(0, 15).toUpperCase() : null,
        regulated_status: 'unregulated',
        three_d_secure: null,
        transaction_link_id: null,
        wallet: null,
      },
      type: 'card',
    },
    receipt_email: null,
    receipt_number: null,
    receipt_url: ok ? `${st.publicUrl}/receipts/${ch.id}` : null,
    refunded: ch.amountRefunded >= ch.amount && ch.amount > 0,
    review: null,
    shipping: null,
    source: null,
    source_transfer: null,
    statement_descriptor: null,
    statement_descriptor_suffix: null,
    status: ch.status,
    transfer_data: null,
    transfer_group: null,
  };
}

export function refundView(r: RefundRec): Obj {
  return {
    id: r.id,
    object: 'refund',
    amount: r.amount,
    balance_transaction: r.balanceTransaction,
    charge: r.charge,
    created: r.created,
    currency: r.currency,
    customer: null,
    customer_account: null,
    destination_details: {
      card: r.status === 'succeeded'
        ? { reference: createHash('sha256').update(r.id).digest('hex').slice(0, 23), reference_status: 'available', reference_type: 'acquirer_reference_number', type: r.destination }
        : { reference_status: r.status === 'failed' ? 'unavailable' : 'pending', type: r.destination },
      type: 'card',
    },
    ...(r.status === 'failed' ? { failure_balance_transaction: r.failureBalanceTransaction, failure_reason: r.failureReason } : {}),
    metadata: { ...r.metadata },
    payment_intent: r.paymentIntent,
    payment_method: r.paymentMethod,
    reason: r.reason,
    receipt_number: null,
    source_transfer_reversal: null,
    status: r.status,
    transfer_reversal: null,
  };
}

/** A page of a list, newest first, as Stripe's list endpoints answer. */
export function listView(items: Obj[], url: string, hasMore: boolean): Obj {
  return { object: 'list', data: items, has_more: hasMore, url };
}

export class ExpandError extends Error {}

type Resource = 'checkout.session' | 'payment_intent' | 'charge' | 'refund' | 'list';

/** The fields each resource lets `expand[]` replace by the object, and how. */
const EXPANDERS: Record<string, Record<string, (value: unknown, obj: Obj, st: Store) => Obj | null>> = {
  'checkout.session': {
    payment_intent: (v, _o, st) => (typeof v === 'string' && st.intents.has(v) ? intentView(st.intents.get(v)!) : null),
  },
  payment_intent: {
    latest_charge: (v, _o, st) => (typeof v === 'string' && st.charges.has(v) ? chargeView(st.charges.get(v)!, st) : null),
  },
  charge: {
    payment_intent: (v, _o, st) => (typeof v === 'string' && st.intents.has(v) ? intentView(st.intents.get(v)!) : null),
    // Not sent at all since API version 2022-11-15 unless expanded.
    refunds: (_v, o, st) => {
      const items = chargeRefunds(st, String(o.id)).map(refundView);
      return listView(items, `/v1/charges/${o.id}/refunds`, false);
    },
  },
  refund: {
    charge: (v, _o, st) => (typeof v === 'string' && st.charges.has(v) ? chargeView(st.charges.get(v)!, st) : null),
    payment_intent: (v, _o, st) => (typeof v === 'string' && st.intents.has(v) ? intentView(st.intents.get(v)!) : null),
  },
};

/** A charge's refunds, newest first. */
export function chargeRefunds(st: Store, chargeId: string): RefundRec[] {
  return [...st.refunds.values()].filter((r) => r.charge === chargeId).sort((a, b) => b.created - a.created || (a.id < b.id ? 1 : -1));
}

/**
 * Replaces each path in `expand[]` (a.b.c, at most four levels, `data.` for a list's items)
 * by its object; a path the resource cannot expand is refused as Stripe refuses it.
 */
export function expand(obj: Obj, paths: string[], st: Store): Obj {
  for (const path of paths) {
    const parts = path.split('.');
    if (parts.length > 4) throw new ExpandError(`You cannot expand more than 4 levels of a property. Property: ${path}`);
    expandPath(obj, parts, path, st);
  }
  return obj;
}

function expandPath(obj: Obj, parts: string[], whole: string, st: Store): void {
  const [head, ...rest] = parts;
  const resource = obj.object as Resource;
  if (resource === 'list') {
    if (head !== 'data' || !rest.length) throw new ExpandError(`This property cannot be expanded (${whole}).`);
    for (const item of obj.data as Obj[]) expandPath(item, rest, whole, st);
    return;
  }
  const fn = EXPANDERS[resource]?.[head];
  let value = obj[head];
  if (fn) {
    if (typeof value === 'string' || (head === 'refunds' && value === undefined)) {
      const full = fn(value, obj, st);
      if (full) obj[head] = full;
      value = obj[head];
    }
  } else if (!(value && typeof value === 'object' && rest.length)) {
    throw new ExpandError(`This property cannot be expanded (${whole}).`);
  }
  if (rest.length && value && typeof value === 'object') expandPath(value as Obj, rest, whole, st);
}
