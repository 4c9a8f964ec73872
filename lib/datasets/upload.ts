import { AppError } from '@/lib/errors';
import { declaredLength, discardBody, readBytesCapped } from '@/lib/http/body';
import { uploadSizeLimit } from './limits';

export interface UploadedFile {
  bytes: Uint8Array;
  filename: string;
  name?: string;
}

/** Room for multipart framing (boundaries, part headers, a name field) on top of the file itself. */
export const MULTIPART_ALLOWANCE_BYTES = 64 * 1024;

const RAW_TYPES = ['text/csv', 'text/plain', 'text/tab-separated-values', 'application/csv'];

/**
 * Read an upload from a request: multipart form-data (field `file`, or `text` for a
 * pasted table, optional `name`) or a raw CSV body (text/csv or text/plain; the name
 * and filename may come as ?name= and ?filename=). The body is read as it streams,
 * with the plan's upload size as the cap: a declared size over it is refused unread,
 * and a body without one (chunked) is cut off at the first chunk past it (413).
 */
export async function readUpload(request: Request, workspaceId: number): Promise<UploadedFile> {
  const contentType = request.headers.get('content-type') ?? '';
  const type = contentType.toLowerCase();
  const multipart = type.startsWith('multipart/form-data');
  if (!multipart && !RAW_TYPES.some((t) => type.startsWith(t))) {
    await discardBody(request.body);
    throw new AppError('unsupported_media_type', 'Send the table as a CSV file: multipart form-data with a "file" field, or a text/csv body.');
  }
  const limit = await uploadSizeLimit(workspaceId);
  const bodyCap = limit.fileBytes + (multipart ? MULTIPART_ALLOWANCE_BYTES : 0);
  const declared = declaredLength(request.headers);
  if (declared !== null && declared > bodyCap) {
    await discardBody(request.body);
    throw limit.tooLarge(declared);
  }
  const body = await readBytesCapped(request.body, bodyCap, () => limit.tooLarge());
  if (!multipart) {
    const url = new URL(request.url);
    return { bytes: body, filename: url.searchParams.get('filename') || 'upload.csv', name: url.searchParams.get('name') || undefined };
  }

  let form: FormData;
  try {
    // The bytes read are within the cap; the form parser only ever sees those.
    // The header as sent: the multipart boundary is case-sensitive.
    form = await new Response(body as BodyInit, { headers: { 'content-type': contentType } }).formData();
  } catch {
    throw new AppError('bad_request', 'The upload could not be read as a form; send the file in a field named "file".');
  }
  const name = stringField(form.get('name'));
  const file = form.get('file');
  if (file && typeof file !== 'string') {
    // The framing allowance must not let a file itself pass the plan's size.
    if (file.size > limit.fileBytes) throw limit.tooLarge(file.size);
    return { bytes: new Uint8Array(await file.arrayBuffer()), filename: file.name || 'upload.csv', name };
  }
  const text = stringField(form.get('text')) ?? (typeof file === 'string' ? file : undefined);
  if (text !== undefined) {
    const bytes = new TextEncoder().encode(text);
    if (bytes.length > limit.fileBytes) throw limit.tooLarge(bytes.length);
    return { bytes, filename: 'pasted.csv', name };
  }
  throw new AppError('invalid_input', 'Choose a CSV file (field "file") or paste a table (field "text").', { issues: [{ field: 'file', message: 'missing' }] });
}

function stringField(v: FormDataEntryValue | null): string | undefined {
  return typeof v === 'string' && v.trim() !== '' ? v : undefined;
}
