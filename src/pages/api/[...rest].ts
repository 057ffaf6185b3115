import type { APIRoute } from 'astro';
import { errorResponse } from '../../server/http.ts';

/** Any /api address no endpoint answers: a JSON 404, not the HTML page. */
export const ALL: APIRoute = () => errorResponse('NOT_FOUND', 'There is no such API endpoint.');
