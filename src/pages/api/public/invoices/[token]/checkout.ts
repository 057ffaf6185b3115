import { route } from '../../../../../server/http.ts';
import { startCheckout } from '../../../../../server/services/public-invoices.ts';

/** The customer's Pay online: a Checkout Session for the balance, whose hosted page the browser opens. */
export const POST = route({ access: 'public', handle: ({ params }) => startCheckout(params.token) });
