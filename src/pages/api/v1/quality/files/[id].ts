import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam, readQuery } from '../../../../../lib/server/http.ts';
import { getFile } from '../../../../../lib/server/services/quality.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';

export const contract = {
  GET: operation({
    summary: 'A test’s attached file',
    tag: 'quality',
    action: 'view',
    query: z.object({
      download: z
        .string()
        .optional()
        .meta({ description: '`1`: always as an attachment (images and PDFs open inline otherwise)' }),
    }),
    responses: {
      200: {
        binary: ['image/png', 'image/jpeg', 'application/pdf', 'text/csv', 'text/plain'],
        description: 'The stored file with the content type judged at upload',
      },
    },
  }),
};

/**
 * A stored attachment, to signed-in users only, with the content type judged at upload and a
 * content-disposition (images and PDFs inline, text and CSV as a download). `nosniff` and a
 * sandboxing CSP keep the browser from treating the content as anything else.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, contract.GET.action);
  const f = await getFile(idParam(params['id'], 'file'));
  if (!f) throw new HttpProblem(404, 'Not found', 'No such file.');
  const inline = f.mime.startsWith('image/') || f.mime === 'application/pdf';
  const disposition = inline && readQuery(url, contract.GET.query).download !== '1' ? 'inline' : 'attachment';
  return new Response(new Uint8Array(f.content), {
    headers: {
      'content-type': f.mime.startsWith('text/') ? `${f.mime}; charset=utf-8` : f.mime,
      'content-disposition': `${disposition}; filename="${f.filename}"`,
      'content-length': String(f.content.length),
      'x-content-type-options': 'nosniff',
      'content-security-policy': "default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; sandbox",
      'cache-control': 'private, max-age=3600',
      etag: `"${f.sha256}"`,
    },
  });
};
