// SHA-256 through Web Crypto. `globalThis.crypto.subtle` exists in Node 20 and in every browser we
// support, so the command line, the worker and the tests share one code path and one answer.

const encoder = new TextEncoder()

/**
 * The SHA-256 digest (FIPS 180-4) of `data` as 64 lowercase hex digits. Strings are hashed as
 * their UTF-8 bytes, so a notebook hashes the same whichever platform read it.
 */
export async function sha256Hex(data: string | Uint8Array<ArrayBuffer>): Promise<string> {
  const subtle = globalThis.crypto?.subtle
  if (!subtle) throw new Error('SHA-256 needs Web Crypto (globalThis.crypto.subtle), which this runtime lacks')
  const bytes = typeof data === 'string' ? encoder.encode(data) : data
  const digest = new Uint8Array(await subtle.digest('SHA-256', bytes))
  let hex = ''
  for (const byte of digest) hex += byte.toString(16).padStart(2, '0')
  return hex
}

/** True for a well-formed digest as `sha256Hex` writes it. */
export function isSha256Hex(value: unknown): value is string {
  return typeof value === 'string' && /^[0-9a-f]{64}$/.test(value)
}
