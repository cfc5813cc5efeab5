/**
 * Reading a multipart corpus upload: one `file` (multer, memory storage, size limit MAX_UPLOAD_BYTES)
 * and an `options` field holding JSON. Errors become 413 (too large) or 422 (what to fix).
 */
import type { Request, Response } from 'express';
import multer from 'multer';
import { corpusOptionsSchema, type CorpusOptions } from '../../../shared/api/corpora';
import { ErrorCode } from '../../../shared/api/errors';
import { HttpError, fromZodError, validationFailed } from '../../http-error';

export interface CorpusUpload {
  bytes: Uint8Array;
  fileName: string;
  options: CorpusOptions;
  /** Other text fields of the form (name, description on save). */
  fields: Record<string, unknown>;
}

function megabytes(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB` : `${Math.round(bytes / 1024)} kB`;
}

export function uploadReader(maxBytes: number): (req: Request, res: Response) => Promise<CorpusUpload> {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 },
  }).single('file');

  return async (req, res) => {
    await new Promise<void>((done, fail) => {
      upload(req, res, (error: unknown) => {
        if (!error) return done();
        if (error instanceof multer.MulterError) {
          if (error.code === 'LIMIT_FILE_SIZE') {
            return fail(new HttpError(413, ErrorCode.PayloadTooLarge, `The file is larger than the upload limit of ${megabytes(maxBytes)}; split it or remove rare words, then upload it again.`));
          }
          if (error.code === 'LIMIT_UNEXPECTED_FILE' || error.code === 'LIMIT_FILE_COUNT') {
            return fail(validationFailed({ file: 'Send exactly one file, in the form field "file".' }));
          }
          return fail(validationFailed({ file: `The upload form is not valid (${error.message}); send one file and the options.` }));
        }
        fail(new HttpError(400, ErrorCode.MalformedRequest, 'The upload could not be read; send it as multipart/form-data with a "file" field.'));
      });
    });
    const file = req.file;
    if (!file) throw validationFailed({ file: 'Choose a file to upload (.txt, .tsv or .csv).' });
    const body = (req.body ?? {}) as Record<string, unknown>;
    let raw: unknown = {};
    if (typeof body['options'] === 'string' && body['options'].trim() !== '') {
      try {
        raw = JSON.parse(body['options']);
      } catch {
        throw validationFailed({ options: 'The options are not valid JSON; send them as a JSON object.' });
      }
    }
    const parsed = corpusOptionsSchema.safeParse(raw);
    if (!parsed.success) {
      const err = fromZodError(parsed.error);
      const fields = Object.fromEntries(Object.entries(err.fields ?? {}).map(([k, v]) => [k === '_' ? 'options' : `options.${k}`, v]));
      throw validationFailed(fields);
    }
    // Browsers send file names as Latin-1 bytes of the UTF-8 name (multer does not decode them).
    const fileName = Buffer.from(file.originalname, 'latin1').toString('utf8').slice(0, 255);
    return { bytes: new Uint8Array(file.buffer.buffer, file.buffer.byteOffset, file.buffer.byteLength), fileName, options: parsed.data, fields: body };
  };
}
