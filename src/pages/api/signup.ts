import { auth, CLIENT_IP_HEADER } from '../../server/auth/auth.ts';
import { AppError } from '../../lib/errors.ts';
import { route } from '../../server/http.ts';
import { signUpInput } from '../../lib/auth/schema.ts';
import { createCompany } from '../../server/services/companies.ts';
import { db } from '../../server/db.ts';

/**
 * The first person of a company signs up and creates it; they are its owner. The answer is
 * the same whether the address is new or already has an account (better-auth then mails its
 * holder instead): "check your e-mail". The link in that mail confirms the address and signs
 * the person in; nobody is signed in before.
 */
export const POST = route({
  access: 'public',
  body: signUpInput,
  status: 202,
  handle: async ({ ctx, body }) => {
    const headers = new Headers(ctx.request.headers);
    headers.set(CLIENT_IP_HEADER, ctx.clientAddress);
    const res = await auth().api.signUpEmail({ body: { name: body.name, email: body.email, password: body.password, callbackURL: '/' }, headers, asResponse: true });
    if (res.status === 429) throw new AppError('RATE_LIMITED', 'Too many sign-ups from here. Try again in a minute.');
    if (!res.ok) {
      const err = (await res.json().catch(() => ({}))) as { message?: string };
      throw new AppError('BAD_INPUT', err.message ?? 'The account could not be created.', { password: err.message ?? 'Not accepted.' });
    }
    const { user } = (await res.json()) as { user: { id: string } };
    // A known address gets a stand-in user that is not in the database: no company for it.
    const created = await db()('user').where({ id: user.id, emailVerified: false }).first('id');
    if (created) await createCompany(user.id, body.companyName);
    return { status: 'check-email', email: body.email };
  },
});
