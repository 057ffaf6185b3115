import type { APIRoute } from 'astro';
import { databaseUp } from '../../server/db.ts';
import { json } from '../../server/http.ts';

export const GET: APIRoute = async () => {
  const up = await databaseUp();
  return json({ ok: up, db: up ? 'up' : 'down' }, up ? 200 : 503);
};
