import type { APIRoute } from 'astro';
import { findExtrema } from '../../../../../lib/domain/quality/fringes.ts';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { HttpProblem, readBody, validate } from '../../../../../lib/server/http.ts';
import {
  looksLikeText,
  MAX_SPECTRUM_BYTES,
  parseSpectrumCsv,
  SpectrumOptionsSchema,
} from '../../../../../lib/shared/spectrum.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { FringeSpectrumAnswerSchema } from '../../../../../lib/shared/api/calc.ts';

const tooLarge = () =>
  new HttpProblem(413, 'Upload too large', `A spectrum file may be at most ${MAX_SPECTRUM_BYTES / 1024 / 1024} MB.`);

export const contract = {
  POST: operation({
    summary: 'Thickness from an uploaded reflectance spectrum',
    tag: 'calculators',
    action: 'calc.use',
    upload: {
      media: ['multipart/form-data', 'text/csv'],
      fields: SpectrumOptionsSchema,
      note: 'multipart/form-data with a CSV `file` (wavelength nm, reflectance; at most 1 MB, text only) and these fields (browsers send a same-origin Origin header); machine clients may send a text/csv body with the same fields as query parameters.',
    },
    responses: { 200: FringeSpectrumAnswerSchema },
    problems: [413],
  }),
};

/**
 * Coat thickness from an uploaded reflectance spectrum: multipart/form-data with a `file`
 * (CSV: wavelength nm, reflectance) and `refractiveIndex` (optional `smoothingWindow`,
 * `minContrast`), or a text/csv body with those as query parameters. ≤ 1 MB (413), text only
 * (binary → 415), bad rows listed by line number (400); a spectrum without usable fringes → 400.
 */
export const POST: APIRoute = async ({ locals, request, url }) => {
  requireRole(locals, contract.POST.action);
  const type = (request.headers.get('content-type') ?? '').toLowerCase();
  // Multipart framing adds a few hundred bytes around the file.
  const body = await readBody(request, MAX_SPECTRUM_BYTES + 16 * 1024);
  let bytes: Uint8Array;
  let fields: Record<string, unknown>;
  if (type.startsWith('multipart/form-data')) {
    let form: FormData;
    try {
      form = await new Response(body, { headers: { 'content-type': request.headers.get('content-type') ?? '' } }).formData();
    } catch {
      throw new HttpProblem(400, 'Malformed upload', 'The multipart body could not be read.');
    }
    const file = form.get('file');
    if (!(file instanceof Blob)) {
      throw new HttpProblem(400, 'Invalid input', 'file: attach the spectrum as a file field named "file".', {
        errors: [{ path: 'file', message: 'Attach the spectrum CSV.' }],
      });
    }
    bytes = new Uint8Array(await file.arrayBuffer());
    fields = Object.fromEntries([...form.entries()].filter(([k, v]) => k !== 'file' && typeof v === 'string'));
  } else if (type.startsWith('text/csv') || type.startsWith('text/plain')) {
    bytes = body;
    fields = Object.fromEntries(url.searchParams.entries());
  } else {
    throw new HttpProblem(
      415,
      'Unsupported media type',
      'Send the spectrum as multipart/form-data (field "file") or as a text/csv body.',
    );
  }
  if (bytes.byteLength > MAX_SPECTRUM_BYTES) throw tooLarge();
  if (bytes.byteLength === 0)
    throw new HttpProblem(400, 'Empty file', 'The spectrum file is empty.', {
      errors: [{ path: 'file', message: 'The file is empty.' }],
    });
  if (!looksLikeText(bytes)) {
    throw new HttpProblem(
      415,
      'Not a text file',
      'The upload is binary; send the spectrum as a CSV text file (wavelength nm, reflectance).',
      {
        errors: [{ path: 'file', message: 'Binary content: export the spectrum as CSV text.' }],
      },
    );
  }
  const options = validate(contract.POST.upload.fields, fields);
  const parsed = parseSpectrumCsv(new TextDecoder('utf-8').decode(bytes));
  if (!parsed.ok) {
    throw new HttpProblem(400, 'Malformed spectrum', parsed.errors.map((e) => `line ${e.line}: ${e.message}`).join('; '), {
      errors: parsed.errors.map((e) => ({ path: `file:line ${e.line}`, message: e.message })),
    });
  }
  let analysis;
  try {
    analysis = findExtrema(parsed.points, {
      refractiveIndex: options.refractiveIndex,
      ...(options.smoothingWindow !== undefined ? { smoothingWindow: options.smoothingWindow } : {}),
      ...(options.minContrast !== undefined ? { minContrast: options.minContrast } : {}),
    });
  } catch (e) {
    if (e instanceof RangeError)
      throw new HttpProblem(400, 'Malformed spectrum', e.message, { errors: [{ path: 'file', message: e.message }] });
    throw e;
  }
  if (!analysis.measurable) {
    throw new HttpProblem(400, 'No measurable fringes', analysis.reason, {
      errors: [{ path: 'file', message: analysis.reason }],
      contrast: analysis.contrast,
      points: parsed.points.length,
    });
  }
  return Response.json({ ...analysis, points: parsed.points.length });
};
