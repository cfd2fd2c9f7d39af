import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';

/** What the upload engine leaves on `req.file`: the bytes on disk, their size and SHA-256. */
export interface StreamedFile {
  path: string;
  size: number;
  sha256: string;
}

/** Where attachment bytes live. The disk store is local; an object store can implement the same. */
export interface AttachmentStorage {
  put(bytes: Buffer): Promise<{ key: string; sha256: string }>;
  /** A path to stream an incoming upload to, on the same volume as the store (so adopting it is a rename). */
  incomingFile(): Promise<string>;
  /** Takes an incoming file (already streamed and hashed) into the store. */
  adopt(incoming: string): Promise<{ key: string }>;
  /** Removes an incoming file that will not be kept. */
  discard(incoming: string): Promise<void>;
  get(key: string): Promise<Buffer>;
  delete(key: string): Promise<void>;
}

/** Files under one folder, named by a random key, two-level fan-out so no folder grows huge. */
export function diskStorage(root: string): AttachmentStorage {
  const fileOf = (key: string) => {
    if (!/^[0-9a-f-]{36}$/.test(key)) throw new Error('invalid storage key');
    return path.join(root, key.slice(0, 2), key);
  };
  const incomingDir = path.join(root, 'incoming');
  const isIncoming = (file: string) => path.dirname(path.resolve(file)) === path.resolve(incomingDir);
  return {
    async put(bytes) {
      const key = randomUUID();
      const file = fileOf(key);
      await fs.mkdir(path.dirname(file), { recursive: true });
      await fs.writeFile(file, bytes, { flag: 'wx', mode: 0o600 });
      return { key, sha256: createHash('sha256').update(bytes).digest('hex') };
    },
    async incomingFile() {
      await fs.mkdir(incomingDir, { recursive: true, mode: 0o700 });
      return path.join(incomingDir, randomUUID());
    },
    async adopt(incoming) {
      if (!isIncoming(incoming)) throw new Error('not an incoming file');
      const key = randomUUID();
      const file = fileOf(key);
      await fs.mkdir(path.dirname(file), { recursive: true });
      await fs.rename(incoming, file);
      return { key };
    },
    async discard(incoming) {
      if (isIncoming(incoming)) await fs.rm(incoming, { force: true });
    },
    get: (key) => fs.readFile(fileOf(key)),
    async delete(key) {
      await fs.rm(fileOf(key), { force: true });
    },
  };
}
