import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../../lib/server/guard.ts';
import { HttpProblem, idParam, readBody } from '../../../../../../lib/server/http.ts';
import { uploadTestFile } from '../../../../../../lib/server/services/quality.ts';
import { MAX_UPLOAD_BYTES } from '../../../../../../lib/shared/file-types.ts';
import { operation } from '../../../../../../lib/server/api-operation.ts';
import { UploadedFileSchema } from '../../../../../../lib/shared/api/quality.ts';

/** Room for the multipart envelope around a 5 MB file. */
const ENVELOPE_BYTES = 64 * 1024;

export const contract = {
  POST: operation({
    summary: 'Attach a photo or spectrum to a test',
    tag: 'quality',
    action: 'quality.record',
    upload: {
      media: ['multipart/form-data'],
      note: 'multipart/form-data with one `file` field: PNG, JPEG, PDF or UTF-8 text/CSV judged by its content (415 otherwise), at most 5 MB (413); a CSV must parse (400). Browsers send a same-origin Origin header.',
    },
    responses: { 201: UploadedFileSchema },
    problems: [413, 422],
  }),
};

/**
 * Attach a file to a test (quality): `multipart/form-data` with one `file` field. At most 5 MB
 * (413); PNG, JPEG, PDF or UTF-8 text/CSV judged by the content's magic bytes (415); a CSV must
 * parse (400). Stored in PostgreSQL with its sha256.
 */
export const POST: APIRoute = async ({ locals, params, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const testId = idParam(params['id'], 'quality test');
  const type = request.headers.get('content-type') ?? '';
  if (!type.startsWith('multipart/form-data')) {
    throw new HttpProblem(415, 'Unsupported media type', 'Send the file as multipart/form-data with a "file" field.', {
      errors: [{ path: 'file', message: 'Send multipart/form-data.' }],
    });
  }
  const length = Number(request.headers.get('content-length') ?? 0);
  if (length > MAX_UPLOAD_BYTES + ENVELOPE_BYTES) {
    throw new HttpProblem(413, 'File too large', `The upload is ${(length / 1048576).toFixed(1)} MB; the limit is 5 MB.`, {
      errors: [{ path: 'file', message: 'The limit is 5 MB.' }],
    });
  }
  // Read through the cap while streaming: a chunked upload declares no length.
  const raw = await readBody(request, MAX_UPLOAD_BYTES + ENVELOPE_BYTES);
  let form: FormData;
  try {
    form = await new Response(raw, { headers: { 'content-type': type } }).formData();
  } catch {
    throw new HttpProblem(400, 'Malformed upload', 'The multipart body could not be read.', {
      errors: [{ path: 'file', message: 'Malformed multipart body.' }],
    });
  }
  const file = form.get('file');
  if (!(file instanceof File))
    throw new HttpProblem(400, 'Invalid input', 'file: missing', { errors: [{ path: 'file', message: 'Choose a file.' }] });
  if (file.size > MAX_UPLOAD_BYTES) {
    throw new HttpProblem(413, 'File too large', `${file.name} is ${(file.size / 1048576).toFixed(1)} MB; the limit is 5 MB.`, {
      errors: [{ path: 'file', message: 'The limit is 5 MB.' }],
    });
  }
  const bytes = new Uint8Array(await file.arrayBuffer());
  return Response.json(await uploadTestFile(user, testId, file.name || 'upload', bytes, clientAddress), { status: 201 });
};
