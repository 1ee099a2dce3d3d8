import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, idParam } from '../../../../../lib/server/http.ts';
import { getFile } from '../../../../../lib/server/services/quality.ts';

/**
 * A stored attachment, to signed-in users only, with the content type judged at upload and a
 * content-disposition (images and PDFs inline, text and CSV as a download). `nosniff` and a
 * sandboxing CSP keep the browser from treating the content as anything else.
 */
export const GET: APIRoute = async ({ locals, params, url }) => {
  requireRole(locals, 'view');
  const f = await getFile(idParam(params['id'], 'file'));
  if (!f) throw new HttpProblem(404, 'Not found', 'No such file.');
  const inline = f.mime.startsWith('image/') || f.mime === 'application/pdf';
  const disposition = inline && url.searchParams.get('download') !== '1' ? 'inline' : 'attachment';
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
