/**
 * Reading a multipart corpus upload: one `file` and an `options` field holding JSON. The file streams to disk
 * (multer disk storage, size limit MAX_UPLOAD_BYTES) in a directory of its own under UPLOAD_TEMP_DIR, so the
 * main thread never holds the whole file; the CPU pool's worker then reads it as a stream. The directory is
 * removed whatever happens: after the analysis, on a refusal (413/422/400), when the client goes away and on a
 * server fault (with the answer at the latest). Errors become 413 (too large) or 422 (what to fix).
 */
import type { Request, Response } from 'express';
import { mkdir, mkdtemp, readdir, rm, stat } from 'node:fs/promises';
import { join } from 'node:path';
import multer from 'multer';
import { corpusOptionsSchema, type CorpusOptions } from '../../../shared/api/corpora';
import { ErrorCode } from '../../../shared/api/errors';
import { HttpError, fromZodError, validationFailed } from '../../http-error';

/** Prefix of each upload's temporary directory (tests look for leftovers by it). */
export const UPLOAD_DIR_PREFIX = 'noisewright-upload-';

export interface CorpusUpload {
  fileName: string;
  /** Bytes received. */
  size: number;
  options: CorpusOptions;
  /** Other text fields of the form (name, description on save). */
  fields: Record<string, unknown>;
  /**
   * Runs `work` with the path of the stored file, then removes the file's directory (also when `work` fails).
   * The file is not there afterwards.
   */
  whileStored<T>(work: (path: string) => Promise<T>): Promise<T>;
}

/** An upload directory this old is left over from a server that was killed mid-upload. */
export const STALE_UPLOAD_MS = 60 * 60 * 1000;

/**
 * Removes upload directories left behind by a server that was killed (SIGKILL, power loss) while it read an
 * upload; at start. Only directories older than STALE_UPLOAD_MS: another server may share the folder.
 * Returns how many were removed.
 */
export async function removeStaleUploads(tempRoot: string, now = Date.now()): Promise<number> {
  const names = await readdir(tempRoot).catch(() => [] as string[]);
  let removed = 0;
  for (const name of names.filter((n) => n.startsWith(UPLOAD_DIR_PREFIX))) {
    const path = join(tempRoot, name);
    const info = await stat(path).catch(() => null);
    if (info?.isDirectory() && now - info.mtimeMs > STALE_UPLOAD_MS) {
      await rm(path, { recursive: true, force: true });
      removed++;
    }
  }
  return removed;
}

function megabytes(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB` : `${Math.round(bytes / 1024)} kB`;
}

function uploadError(error: unknown, maxBytes: number): HttpError {
  if (error instanceof HttpError) return error;
  if (error instanceof multer.MulterError) {
    if (error.code === 'LIMIT_FILE_SIZE') {
      return new HttpError(413, ErrorCode.PayloadTooLarge, `The file is larger than the upload limit of ${megabytes(maxBytes)}; split it or remove rare words, then upload it again.`);
    }
    if (error.code === 'LIMIT_UNEXPECTED_FILE' || error.code === 'LIMIT_FILE_COUNT') {
      return validationFailed({ file: 'Send exactly one file, in the form field "file".' });
    }
    return validationFailed({ file: `The upload form is not valid (${error.message}); send one file and the options.` });
  }
  return new HttpError(400, ErrorCode.MalformedRequest, 'The upload could not be read; send it as multipart/form-data with a "file" field.');
}

function parseOptions(body: Record<string, unknown>): CorpusOptions {
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
  return parsed.data;
}

export function uploadReader(maxBytes: number, tempRoot: string): (req: Request, res: Response) => Promise<CorpusUpload> {
  const limits = { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 };

  return async (req, res) => {
    let dir: Promise<string> | null = null;
    let closed = false;
    const removeDir = async () => {
      const made = dir && (await dir.catch(() => null));
      if (made) await rm(made, { recursive: true, force: true });
    };
    // The safety net: whatever else happens, the directory goes when the answer is sent or the connection closes.
    res.once('close', () => {
      closed = true;
      void removeDir();
    });
    const storage = multer.diskStorage({
      destination: (_req, _file, cb) => {
        if (closed) return cb(new Error('The connection closed.'), '');
        dir ??= mkdir(tempRoot, { recursive: true }).then(() => mkdtemp(join(tempRoot, UPLOAD_DIR_PREFIX)));
        dir.then((d) => cb(null, d), (e: Error) => cb(e, ''));
      },
      filename: (_req, _file, cb) => cb(null, 'upload'),
    });
    const upload = multer({ storage, limits }).single('file');
    try {
      await new Promise<void>((done, fail) => upload(req, res, (error: unknown) => (error ? fail(uploadError(error, maxBytes)) : done())));
      const file = req.file;
      if (!file) throw validationFailed({ file: 'Choose a file to upload (.txt, .tsv or .csv).' });
      const body = (req.body ?? {}) as Record<string, unknown>;
      const options = parseOptions(body);
      // Browsers send file names as Latin-1 bytes of the UTF-8 name (multer does not decode them).
      const fileName = Buffer.from(file.originalname, 'latin1').toString('utf8').slice(0, 255);
      const path = file.path;
      return {
        fileName,
        size: file.size,
        options,
        fields: body,
        async whileStored<T>(work: (path: string) => Promise<T>): Promise<T> {
          try {
            return await work(path);
          } finally {
            await removeDir();
          }
        },
      };
    } catch (error) {
      await removeDir();
      throw error;
    }
  };
}
