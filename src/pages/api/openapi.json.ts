import type { APIRoute } from 'astro';
import { buildOpenApi } from '../../lib/server/openapi.ts';

let cached: string | null = null;

/** Public: the OpenAPI 3.1 document of the API (product.md §6). */
export const GET: APIRoute = async () => {
  cached ??= JSON.stringify(buildOpenApi());
  return new Response(cached, { headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-cache' } });
};
