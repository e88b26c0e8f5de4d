// Receiving a file (multer, in memory, after the route's role check) and storing it
// content-addressed: the same bytes are parsed and stored once, whoever uploads them again.
import type { Request, Response } from 'express';
import multer from 'multer';
import { eq } from 'drizzle-orm';
import { sha256Hex } from '@shared/engine/hash';
import { datasets } from '../../schema/index';
import type { Database } from '../db/client';
import type { Evaluator } from '../evaluation/evaluator';
import { HttpError } from '../http/errors';
import { detectMediaType, MAX_UPLOAD_BYTES, UploadProblem } from './parse';
import { storeDataset, type ParsedInfo } from './store';

export function uploadProblemToHttp(problem: UploadProblem): HttpError {
  const details: { line?: number; column?: number } = {};
  if (problem.line !== undefined) details.line = problem.line;
  if (problem.column !== undefined) details.column = problem.column;
  return new HttpError(problem.status, problem.code, problem.message, Object.keys(details).length > 0 ? details : undefined);
}

const uploaders = new Map<number, multer.Multer>();

/** Reads one file from a multipart body into memory; limit and format problems become 4xx answers. */
export function receiveFile(req: Request, res: Response, field: string, limitBytes: number): Promise<Express.Multer.File | undefined> {
  let upload = uploaders.get(limitBytes);
  if (!upload) {
    upload = multer({ storage: multer.memoryStorage(), defParamCharset: 'utf8', limits: { fileSize: limitBytes, files: 1, fields: 20, fieldSize: 64 * 1024 } });
    uploaders.set(limitBytes, upload);
  }
  if (!req.is('multipart/form-data')) {
    return Promise.reject(new HttpError(400, 'no_file', `Send the file as multipart/form-data in the field "${field}".`));
  }
  return new Promise((resolve, reject) => {
    upload.single(field)(req, res, (error: unknown) => {
      if (!error) {
        resolve(req.file);
        return;
      }
      if (error instanceof multer.MulterError) {
        if (error.code === 'LIMIT_FILE_SIZE') {
          reject(new HttpError(413, 'file_too_large', `The file is larger than the limit of ${Math.round(limitBytes / 1048576)} MB.`));
        } else if (error.code === 'LIMIT_UNEXPECTED_FILE') {
          reject(new HttpError(400, 'bad_upload', `Send one file, in the field "${field}".`));
        } else {
          reject(new HttpError(400, 'bad_upload', `The upload could not be read: ${error.message}.`));
        }
        return;
      }
      reject(new HttpError(400, 'bad_upload', 'The upload could not be read (a broken multipart body).'));
    });
  });
}

/** Parses (unless already stored) and stores a file for a team. Throws HttpError 4xx for a bad file. */
export async function storeUploadedFile(
  db: Database,
  evaluator: Evaluator,
  input: { bytes: Uint8Array; name: string; teamId: string; userId: string },
): Promise<{ id: string; deduplicated: boolean }> {
  if (input.bytes.byteLength > MAX_UPLOAD_BYTES) {
    throw new HttpError(413, 'file_too_large', `The file is larger than the limit of ${MAX_UPLOAD_BYTES / 1048576} MB.`);
  }
  const id = sha256Hex(input.bytes);
  const [known] = await db.select({ mediaType: datasets.mediaType, parsed: datasets.parsed }).from(datasets).where(eq(datasets.id, id));
  let mediaType = known?.mediaType ?? detectMediaType(input.bytes, input.name);
  let parsed = known?.parsed as ParsedInfo | undefined;
  if (!parsed) {
    try {
      parsed = await evaluator.parseUpload(input.bytes, mediaType);
    } catch (error) {
      if (error instanceof UploadProblem) throw uploadProblemToHttp(error);
      throw error;
    }
    mediaType = detectMediaType(input.bytes, input.name);
  }
  const stored = await storeDataset(db, { id, bytes: input.bytes, mediaType, parsed, name: input.name.slice(0, 260) || 'upload', teamId: input.teamId, userId: input.userId });
  return { id, deduplicated: stored.deduplicated };
}
