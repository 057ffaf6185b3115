import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';

/**
 * Checks an object the Stripe stand-in answers or sends against two sources outside the
 * project:
 * - Stripe's published example object for its resource (tests/fixtures/stripe/
 *   openapi-fixtures3.json, from github.com/stripe/openapi, MIT): the value types it shows;
 * - stripe-node's own types (node_modules/stripe, read with the TypeScript compiler), which
 *   describe the API version the app pins: every field Stripe may send (nothing else is
 *   allowed), which ones it always sends (non-optional: must be there), which may be null,
 *   the literal values of enums, and which fields are expandable (`string | Resource`: an id
 *   unless `expand[]` asked, then the object, itself checked).
 * Fields Stripe leaves out unless expanded although the examples show them are listed in
 * ONLY_WHEN_EXPANDED with their source.
 */

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

export const FIXTURES: Record<string, Record<string, unknown>> = JSON.parse(
  fs.readFileSync(path.join(root, 'tests/fixtures/stripe/openapi-fixtures3.json'), 'utf8'),
).resources;

/**
 * Sent only when expanded. Charge.refunds: stripe-node CHANGELOG ("Change ... Charge.refunds
 * ... to be optional", the 2022-11-15 API version: https://docs.stripe.com/changelog/2022-11-15,
 * "Charge no longer auto-expands refunds by default").
 */
export const ONLY_WHEN_EXPANDED: Record<string, string[]> = { charge: ['refunds'], 'checkout.session': ['line_items'] };

/** The stripe-node type of each resource the stand-in answers with. */
export const RESOURCE_TYPES: Record<string, string> = {
  'checkout.session': 'Stripe.Checkout.Session',
  payment_intent: 'Stripe.PaymentIntent',
  charge: 'Stripe.Charge',
  refund: 'Stripe.Refund',
};

/** charge.refund.updated → Stripe.ChargeRefundUpdatedEvent, as stripe-node names them. */
export const eventTypeName = (type: string) => `Stripe.${type.split(/[._]/).map((w) => w[0].toUpperCase() + w.slice(1)).join('')}Event`;

let program: { checker: ts.TypeChecker; anchor: ts.Node; types: Map<string, ts.Type> } | undefined;

/** Reads the named stripe-node types (once, about 2 s). */
export function loadSdkTypes(names: string[]): void {
  const file = path.join(root, '__stripe_contract_types__.ts');
  const src = `import type Stripe from 'stripe';\n${names.map((n, i) => `export type T${i} = ${n};`).join('\n')}\n`;
  const options: ts.CompilerOptions = { module: ts.ModuleKind.NodeNext, moduleResolution: ts.ModuleResolutionKind.NodeNext, target: ts.ScriptTarget.ES2022, noEmit: true, skipLibCheck: true, strict: true, types: [] };
  const host = ts.createCompilerHost(options);
  const getSourceFile = host.getSourceFile.bind(host);
  const fileExists = host.fileExists.bind(host);
  host.getSourceFile = (f, lang, ...rest) => (f === file ? ts.createSourceFile(f, src, lang) : getSourceFile(f, lang, ...rest));
  host.fileExists = (f) => f === file || fileExists(f);
  const p = ts.createProgram([file], options, host);
  const checker = p.getTypeChecker();
  const sf = p.getSourceFile(file)!;
  const types = new Map<string, ts.Type>();
  sf.statements.forEach((st, i) => {
    if (!ts.isTypeAliasDeclaration(st)) return;
    const t = checker.getTypeAtLocation(st.name);
    if (checker.getPropertiesOfType(t).length === 0) throw new Error(`stripe-node has no type ${names[Number(st.name.text.slice(1))]} (or it is empty)`);
    types.set(names[i - 1], t);
  });
  program = { checker, anchor: sf, types };
}

function sdk() {
  if (!program) throw new Error('loadSdkTypes() first');
  return program;
}

export function sdkType(name: string): ts.Type {
  const t = sdk().types.get(name);
  if (!t) throw new Error(`${name} was not loaded`);
  return t;
}

type Obj = Record<string, unknown>;
const kind = (v: unknown) => (v === null ? 'null' : Array.isArray(v) ? 'array' : typeof v);

/** Fields stripe-node says are always sent but Stripe's example lacks (newer than the example): noted, not errors. */
export const newerThanExample = new Set<string>();

/**
 * Every difference between `value` and what Stripe sends, as readable lines (empty when it
 * matches). `expand` is what the request put in expand[], relative to `value`.
 */
export function shapeProblems(value: unknown, typeName: string, expand: string[] = [], where = ''): string[] {
  const out: string[] = [];
  const fixture = value && typeof value === 'object' && !Array.isArray(value) ? FIXTURES[String((value as Obj).object)] : undefined;
  checkValue(value, sdkType(typeName), typeName === 'Stripe.Event' || /Event$/.test(typeName) ? FIXTURES.event : fixture, where || typeName, new Set(expand), out);
  return out;
}

function members(t: ts.Type): ts.Type[] {
  return (t.isUnion() ? t.types : [t]).filter((m) => !(m.flags & ts.TypeFlags.Undefined));
}

function isResource(t: ts.Type): boolean {
  const { checker } = sdk();
  const p = checker.getPropertyOfType(t, 'object');
  if (!p) return false;
  const pt = checker.getTypeOfSymbolAtLocation(p, sdk().anchor);
  return members(pt).every((m) => m.isStringLiteral());
}

function objectLiteralOf(t: ts.Type): string[] {
  const { checker } = sdk();
  const p = checker.getPropertyOfType(t, 'object');
  if (!p) return [];
  return members(checker.getTypeOfSymbolAtLocation(p, sdk().anchor)).filter((m) => m.isStringLiteral()).map((m) => (m as ts.StringLiteralType).value);
}

/** What is left of the expand[] paths below `key`: '' marks `key` itself (a.b expands a too, as Stripe does). */
function below(exp: Set<string>, key: string): Set<string> {
  const out = new Set<string>();
  for (const p of exp) {
    if (p === key) out.add('');
    else if (p.startsWith(`${key}.`)) out.add('').add(p.slice(key.length + 1));
  }
  return out;
}

function checkValue(v: unknown, t: ts.Type, fx: unknown, where: string, exp: Set<string>, out: string[]): void {
  const { checker } = sdk();
  const ms = members(t);
  const has = (flags: ts.TypeFlags) => ms.some((m) => (m.flags & flags) !== 0);
  const typeText = () => checker.typeToString(t);
  const objs = ms.filter((m) => (m.flags & (ts.TypeFlags.Object | ts.TypeFlags.Intersection)) !== 0 && !checker.isArrayType(m));
  const expandable = has(ts.TypeFlags.String | ts.TypeFlags.StringLiteral) && objs.some(isResource);
  const fixtureKind = fx === undefined || fx === null ? null : kind(fx);
  if (v === null) {
    // In an update event's previous_attributes, null stands for "was not set" (as in real
    // charge.refund.updated events: failure_reason and failure_balance_transaction go from null
    // to set; e.g. zulip/zulip zerver/webhooks/stripe/fixtures/refund_event.json).
    if (where.includes('.previous_attributes.')) return;
    if (!has(ts.TypeFlags.Null) && fx !== null) out.push(`${where}: null, but stripe-node types it ${typeText()}`);
    return;
  }
  switch (typeof v) {
    case 'string': {
      if (expandable && exp.has('')) out.push(`${where}: an id, but expand[] asked for the object`);
      const literals = ms.filter((m) => m.isStringLiteral()).map((m) => (m as ts.StringLiteralType).value);
      if (has(ts.TypeFlags.String)) { /* any string */ } else if (literals.length) {
        if (!literals.includes(v)) out.push(`${where}: "${v}" is not one of ${literals.map((l) => `"${l}"`).join(', ')}`);
      } else out.push(`${where}: a string, but stripe-node types it ${typeText()}`);
      if (fixtureKind && fixtureKind !== 'string' && !(expandable && fixtureKind === 'object')) out.push(`${where}: a string, Stripe's example has ${fixtureKind}`);
      return;
    }
    case 'number':
      if (!has(ts.TypeFlags.Number | ts.TypeFlags.NumberLiteral)) out.push(`${where}: a number, but stripe-node types it ${typeText()}`);
      if (fixtureKind && fixtureKind !== 'number') out.push(`${where}: a number, Stripe's example has ${fixtureKind}`);
      return;
    case 'boolean':
      if (!has(ts.TypeFlags.Boolean | ts.TypeFlags.BooleanLiteral)) out.push(`${where}: a boolean, but stripe-node types it ${typeText()}`);
      if (fixtureKind && fixtureKind !== 'boolean') out.push(`${where}: a boolean, Stripe's example has ${fixtureKind}`);
      return;
    case 'object':
      break;
    default:
      out.push(`${where}: a ${typeof v}, which JSON cannot carry`);
      return;
  }
  if (Array.isArray(v)) {
    const arr = ms.find((m) => checker.isArrayType(m));
    if (!arr) {
      out.push(`${where}: an array, but stripe-node types it ${typeText()}`);
      return;
    }
    if (fixtureKind && fixtureKind !== 'array') out.push(`${where}: an array, Stripe's example has ${fixtureKind}`);
    const item = checker.getTypeArguments(arr as ts.TypeReference)[0];
    v.forEach((x, i) => checkValue(x, item, Array.isArray(fx) ? fx[0] : undefined, `${where}[${i}]`, exp, out));
    return;
  }
  const o = v as Obj;
  if (!objs.length) {
    out.push(`${where}: an object, but stripe-node types it ${typeText()}`);
    return;
  }
  if (expandable && !exp.has('')) out.push(`${where}: the whole object, but expand[] did not ask for it (Stripe sends the id)`);
  if (fixtureKind && fixtureKind !== 'object' && !expandable) out.push(`${where}: an object, Stripe's example has ${fixtureKind}`);
  const target = (typeof o.object === 'string' && objs.find((m) => objectLiteralOf(m).includes(o.object as string))) || objs[0];
  const resource = isResource(target) && typeof o.object === 'string' ? (o.object as string) : null;
  const nestedFixture = resource && resource !== 'list' && resource !== 'event' && FIXTURES[resource] ? FIXTURES[resource] : fx && typeof fx === 'object' && !Array.isArray(fx) ? (fx as Obj) : undefined;
  checkObject(o, target, nestedFixture, where, exp, resource, out);
}

function checkObject(o: Obj, t: ts.Type, fx: Obj | undefined, where: string, exp: Set<string>, resource: string | null, out: string[]): void {
  const { checker, anchor } = sdk();
  const props = checker.getPropertiesOfType(t);
  const index = checker.getIndexInfoOfType(t, ts.IndexKind.String);
  if (!props.length && index) {
    for (const [k, x] of Object.entries(o)) checkValue(x, index.type, undefined, `${where}.${k}`, new Set(), out);
    return;
  }
  const declared = new Map(props.map((p) => [p.name, p]));
  for (const k of Object.keys(o)) {
    const p = declared.get(k);
    if (!p) {
      out.push(`${where}: sends "${k}", which Stripe does not send (not in stripe-node's types${fx && k in fx ? '' : ' nor in Stripe\'s example'})`);
      continue;
    }
    const sub = below(exp, k);
    if (resource && ONLY_WHEN_EXPANDED[resource]?.includes(k) && !sub.size) out.push(`${where}.${k}: sent, but Stripe sends it only when expand[] asks`);
    const pt = checker.getTypeOfSymbolAtLocation(p, anchor);
    // A list's items take the paths below `data` as their own (checkValue passes them to each item).
    checkValue(o[k], pt, fx?.[k], `${where}.${k}`, sub, out);
  }
  for (const p of props) {
    const optional = (p.flags & ts.SymbolFlags.Optional) !== 0;
    if (optional || p.name in o) continue;
    out.push(`${where}: leaves out "${p.name}", which Stripe always sends`);
  }
  if (fx && resource) for (const p of props) if (!(p.flags & ts.SymbolFlags.Optional) && !(p.name in fx)) newerThanExample.add(`${resource}.${p.name}`);
}
