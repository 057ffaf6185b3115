import { auth, CLIENT_IP_HEADER } from '../../server/auth/auth.ts';
import { AppError } from '../../lib/errors.ts';
import { route } from '../../server/http.ts';
import { signUpInput } from '../../lib/auth/schema.ts';
import { createCompany } from '../../server/services/companies.ts';

/** The first person of a company signs up and creates it; they are its owner. */
export const POST = route({
  access: 'public',
  body: signUpInput,
  status: 201,
  handle: async ({ ctx, body }) => {
    const headers = new Headers(ctx.request.headers);
    headers.set(CLIENT_IP_HEADER, ctx.clientAddress);
    const res = await auth().api.signUpEmail({ body: { name: body.name, email: body.email, password: body.password }, headers, asResponse: true });
    if (!res.ok) {
      const err = (await res.json().catch(() => ({}))) as { code?: string; message?: string };
      if (err.code === 'USER_ALREADY_EXISTS' || err.code === 'USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL' || res.status === 422) {
        throw new AppError('DUPLICATE_EMAIL', 'An account with this e-mail already exists. Sign in instead.', { email: 'Already has an account.' });
      }
      throw new AppError('BAD_INPUT', err.message ?? 'The account could not be created.', { password: err.message ?? 'Not accepted.' });
    }
    const cookies = res.headers.getSetCookie();
    const cookieHeader = cookies.map((c) => c.split(';')[0]).join('; ');
    const company = await createCompany(new Headers({ cookie: cookieHeader }), body.companyName);
    const out = new Response(JSON.stringify({ company }), { status: 201, headers: { 'content-type': 'application/json' } });
    for (const c of cookies) out.headers.append('set-cookie', c);
    return out;
  },
});
