import type { APIRoute } from 'astro';
import { z } from 'zod';
import { operation } from '../../lib/server/api-operation.ts';
import { buildOpenApi } from '../../lib/server/openapi.ts';

export const contract = {
  GET: operation({
    summary: 'This OpenAPI 3.1 document',
    tag: 'service',
    action: 'public',
    responses: { 200: z.looseObject({ openapi: z.literal('3.1.0') }).meta({ description: 'An OpenAPI 3.1 document' }) },
  }),
};

let cached: string | null = null;

/** Public: the OpenAPI 3.1 document of the API (product.md §6), generated from every route's contract. */
export const GET: APIRoute = async () => {
  cached ??= JSON.stringify(await buildOpenApi());
  return new Response(cached, { headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-cache' } });
};
