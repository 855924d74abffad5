/** Prefixes of the stable ids in a life-cycle document. */
export type IdPrefix = "st" | "tr" | "vr" | (string & {});

const ALPHABET = "0123456789abcdefghjkmnpqrstvwxyz"; // 32 symbols: 5 bits each
const ID_RANDOM_LENGTH = 16; // 80 random bits

/** Ids are 1–64 letters, digits, "_" or "-". */
export const ID_PATTERN = /^[A-Za-z0-9_-]{1,64}$/;

/**
 * A new random id such as `st_4k9x0q2m1abz7tw3`: prefix, underscore, 16
 * characters (80 bits) from globalThis.crypto.getRandomValues, which
 * browsers and Node 20 both provide.
 */
export function newId(prefix: IdPrefix): string {
  if (!/^[a-z]{1,8}$/.test(prefix)) throw new RangeError(`An id prefix is 1 to 8 lowercase letters; got "${prefix}".`);
  const crypto = globalThis.crypto as Crypto | undefined;
  if (crypto === undefined || typeof crypto.getRandomValues !== "function") {
    throw new Error("newId needs globalThis.crypto.getRandomValues (available in browsers and Node 20+).");
  }
  const bytes = crypto.getRandomValues(new Uint8Array(ID_RANDOM_LENGTH));
  let out = `${prefix}_`;
  // 256 is a multiple of 32, so taking the low 5 bits keeps every symbol equally likely.
  for (const b of bytes) out += ALPHABET[b & 31];
  return out;
}
