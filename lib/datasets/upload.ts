import { AppError } from '@/lib/errors';
import { assertDeclaredSize } from './limits';

export interface UploadedFile {
  bytes: Uint8Array;
  filename: string;
  name?: string;
}

/**
 * Read an upload from a request: multipart form-data (field `file`, or `text` for a
 * pasted table, optional `name`) or a raw CSV body (text/csv or text/plain; the name
 * and filename may come as ?name= and ?filename=). A declared size over the plan's
 * limit is refused before the body is read.
 */
export async function readUpload(request: Request, workspaceId: number): Promise<UploadedFile> {
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (declared > 0) await assertDeclaredSize(workspaceId, declared);
  const type = (request.headers.get('content-type') ?? '').toLowerCase();
  const url = new URL(request.url);
  if (type.startsWith('multipart/form-data')) {
    let form: FormData;
    try {
      form = await request.formData();
    } catch {
      throw new AppError('bad_request', 'The upload could not be read as a form; send the file in a field named "file".');
    }
    const name = stringField(form.get('name'));
    const file = form.get('file');
    if (file && typeof file !== 'string') {
      return { bytes: new Uint8Array(await file.arrayBuffer()), filename: file.name || 'upload.csv', name };
    }
    const text = stringField(form.get('text')) ?? (typeof file === 'string' ? file : undefined);
    if (text !== undefined) return { bytes: new TextEncoder().encode(text), filename: 'pasted.csv', name };
    throw new AppError('invalid_input', 'Choose a CSV file (field "file") or paste a table (field "text").', { issues: [{ field: 'file', message: 'missing' }] });
  }
  if (type.startsWith('text/csv') || type.startsWith('text/plain') || type.startsWith('text/tab-separated-values') || type.startsWith('application/csv')) {
    return {
      bytes: new Uint8Array(await request.arrayBuffer()),
      filename: url.searchParams.get('filename') || 'upload.csv',
      name: url.searchParams.get('name') || undefined,
    };
  }
  throw new AppError('unsupported_media_type', 'Send the table as a CSV file: multipart form-data with a "file" field, or a text/csv body.');
}

function stringField(v: FormDataEntryValue | null): string | undefined {
  return typeof v === 'string' && v.trim() !== '' ? v : undefined;
}
