import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { pipeline } from 'node:stream/promises';
import { Transform } from 'node:stream';
import multer, { type StorageEngine } from 'multer';
import type { Request, RequestHandler } from 'express';
import type { AttachmentStorage, StreamedFile } from '../attachments/storage';
import { HttpError } from './problem';
import { retryAfterSeconds } from '../db/availability';

/**
 * multer storage that streams the upload to the store's incoming folder while hashing it: memory
 * stays flat however large or many the files. More than `maxBytes` is refused as it arrives.
 */
function streamingStorage(storage: AttachmentStorage, maxBytes: number): StorageEngine {
  return {
    _handleFile(_req, file, cb) {
      void (async () => {
        const target = await storage.incomingFile();
        const hash = createHash('sha256');
        let size = 0;
        const meter = new Transform({
          transform(chunk: Buffer, _enc, done) {
            size += chunk.length;
            if (size > maxBytes) return done(Object.assign(new Error('File too large'), { code: 'LIMIT_FILE_SIZE' }));
            hash.update(chunk);
            done(null, chunk);
          },
        });
        try {
          await pipeline(file.stream, meter, fs.createWriteStream(target, { flags: 'wx', mode: 0o600 }));
        } catch (error) {
          await storage.discard(target);
          file.stream.resume(); // drain what is left so the request can end
          throw error;
        }
        return { path: target, size, sha256: hash.digest('hex') } satisfies StreamedFile;
      })().then(
        (info) => cb(null, info),
        (error) => cb(error),
      );
    },
    _removeFile(_req, file, cb) {
      storage.discard((file as unknown as StreamedFile).path).then(() => cb(null), cb);
    },
  };
}

/**
 * One file in the form field "file", at most `maxBytes` (exactly `maxBytes` is accepted), with at
 * most `maxConcurrent` uploads in progress at once: more are answered 503 with Retry-After.
 */
export function acceptUpload(storage: AttachmentStorage, maxBytes: number, maxConcurrent: number): RequestHandler {
  // busboy reports its limit when a file *reaches* it, so its limit is one byte above ours.
  const upload = multer({ storage: streamingStorage(storage, maxBytes), limits: { fileSize: maxBytes + 1, files: 1, fields: 5 } }).single('file');
  let inProgress = 0;
  return (req: Request, res, next) => {
    if (inProgress >= maxConcurrent) {
      res.set('Retry-After', String(retryAfterSeconds));
      return next(new HttpError(503, 'uploads-busy', 'Too many uploads at once', 'Other files are being uploaded. Try again in a few seconds.'));
    }
    inProgress++;
    let released = false;
    const release = () => {
      if (!released) {
        released = true;
        inProgress--;
      }
    };
    res.on('close', release);
    upload(req, res, (err: unknown) => {
      release();
      if (!err) return next();
      const code = (err as { code?: string }).code;
      if (code === 'LIMIT_FILE_SIZE') {
        return next(new HttpError(413, 'file-too-large', 'File too large', `Attachments may be at most ${+(maxBytes / 1048576).toFixed(2)} MB.`));
      }
      next(new HttpError(400, 'bad-upload', 'The upload could not be read', 'Send one file in the form field "file".'));
    });
  };
}
