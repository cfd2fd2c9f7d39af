import { createHash } from 'node:crypto';

/** Isobar's namespace for name-based UUIDs (a fixed random UUID; never change it). */
export const ISOBAR_UUID_NAMESPACE = '933626da-06e7-4ce7-8fd5-6886afadeed6';

function bytesOf(uuid: string): Buffer {
  const hex = uuid.replace(/-/g, '');
  if (!/^[0-9a-f]{32}$/i.test(hex)) throw new Error(`not a UUID: ${uuid}`);
  return Buffer.from(hex, 'hex');
}

/**
 * A name-based UUID, version 5 (SHA-1), as RFC 9562 §5.5 defines it: the same namespace and name
 * always give the same UUID, so a bundle built twice from the same report carries the same ids.
 */
export function uuidV5(name: string, namespace: string = ISOBAR_UUID_NAMESPACE): string {
  const hash = createHash('sha1').update(bytesOf(namespace)).update(name, 'utf8').digest();
  const b = hash.subarray(0, 16);
  b[6] = (b[6] & 0x0f) | 0x50; // version 5
  b[8] = (b[8] & 0x3f) | 0x80; // variant 10xx
  const h = b.toString('hex');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}

/** `urn:uuid:` form for Bundle.entry.fullUrl. */
export const urnUuid = (name: string) => `urn:uuid:${uuidV5(name)}`;
