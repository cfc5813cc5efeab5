/**
 * Reading checkpoint files from requests: a raw `application/octet-stream` body (upload to a run) or a
 * multipart form with one `file` (import as a new run). Both stop at MAX_CHECKPOINT_BYTES with a 413.
 */
import express, { type Request, type RequestHandler, type Response } from 'express';
import multer from 'multer';
import { ErrorCode } from '../../../shared/api/errors';
import { HttpError, validationFailed } from '../../http-error';

export function megabytes(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB` : `${Math.round(bytes / 1024)} kB`;
}

const tooLarge = (maxBytes: number) =>
  new HttpError(
    413,
    ErrorCode.PayloadTooLarge,
    `The checkpoint file is larger than the limit of ${megabytes(maxBytes)}; use a smaller model, or ask your admin to raise MAX_CHECKPOINT_BYTES.`,
  );

/** Parses an octet-stream body into `req.body` (a Buffer), with our own 413 message. */
export function rawCheckpointBody(maxBytes: number): RequestHandler {
  const parse = express.raw({ type: 'application/octet-stream', limit: maxBytes });
  return (req, res, next) => {
    parse(req, res, (error?: unknown) => {
      if (error && typeof error === 'object' && (error as { type?: unknown }).type === 'entity.too.large') return next(tooLarge(maxBytes));
      next(error);
    });
  };
}

/** The bytes of a raw checkpoint body; 400 when the request did not send one. */
export function checkpointBytes(req: Request): Uint8Array {
  if (!Buffer.isBuffer(req.body)) {
    throw new HttpError(
      400,
      ErrorCode.MalformedRequest,
      'Send the checkpoint file itself as the request body, with the header Content-Type: application/octet-stream.',
    );
  }
  const body = req.body as Buffer;
  return new Uint8Array(body.buffer, body.byteOffset, body.byteLength);
}

export interface CheckpointFileUpload {
  bytes: Uint8Array;
  fileName: string;
  fields: Record<string, unknown>;
}

/** Reads a multipart form with one `file` field (and a few text fields). */
export function checkpointFileReader(maxBytes: number): (req: Request, res: Response) => Promise<CheckpointFileUpload> {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxBytes, files: 1, fields: 5, fieldSize: 4 * 1024, parts: 6 },
  }).single('file');
  return async (req, res) => {
    await new Promise<void>((done, fail) => {
      upload(req, res, (error: unknown) => {
        if (!error) return done();
        if (error instanceof multer.MulterError) {
          if (error.code === 'LIMIT_FILE_SIZE') return fail(tooLarge(maxBytes));
          if (error.code === 'LIMIT_UNEXPECTED_FILE' || error.code === 'LIMIT_FILE_COUNT') {
            return fail(validationFailed({ file: 'Send exactly one checkpoint file, in the form field "file".' }));
          }
          return fail(validationFailed({ file: `The upload form is not valid (${error.message}); send one checkpoint file.` }));
        }
        fail(new HttpError(400, ErrorCode.MalformedRequest, 'The upload could not be read; send it as multipart/form-data with a "file" field.'));
      });
    });
    const file = req.file;
    if (!file) throw validationFailed({ file: 'Choose a checkpoint file (.nwck) to import.' });
    // Browsers send file names as Latin-1 bytes of the UTF-8 name (multer does not decode them).
    const fileName = Buffer.from(file.originalname, 'latin1').toString('utf8').slice(0, 255);
    const bytes = new Uint8Array(file.buffer.buffer, file.buffer.byteOffset, file.buffer.byteLength);
    return { bytes, fileName, fields: (req.body ?? {}) as Record<string, unknown> };
  };
}
