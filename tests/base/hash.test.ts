import { createHash } from 'node:crypto'
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { isSha256Hex, sha256Hex } from '../../kernels/base/hash'

describe('sha256Hex', () => {
  it('matches the published one-block test vector for "abc"', async () => {
    // Source: FIPS 180-2, Secure Hash Standard, Appendix B.1 (SHA-256 example, one-block message).
    expect(await sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad')
  })

  it('matches the published two-block test vector', async () => {
    // Source: FIPS 180-2, Secure Hash Standard, Appendix B.2 (SHA-256 example, multi-block message).
    expect(await sha256Hex('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    )
  })

  it('hashes the empty string to the well-known empty digest', async () => {
    // Value recalled from memory (the SHA-256 of zero bytes); the node:crypto oracle below confirms it.
    expect(await sha256Hex('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855')
  })

  it('hashes strings as UTF-8, agreeing with node:crypto on arbitrary text', async () => {
    // Independent oracle: Node's OpenSSL-backed createHash, a different implementation from Web Crypto's entry point.
    await fc.assert(
      fc.asyncProperty(fc.string({ unit: 'grapheme', maxLength: 40 }), async (text) => {
        expect(await sha256Hex(text)).toBe(createHash('sha256').update(text, 'utf8').digest('hex'))
      }),
      { numRuns: 60 },
    )
  })

  it('hashes bytes and the same text identically', async () => {
    expect(await sha256Hex(new TextEncoder().encode('lighthouse ☼'))).toBe(await sha256Hex('lighthouse ☼'))
  })

  it('writes 64 lowercase hex digits', async () => {
    expect(isSha256Hex(await sha256Hex('depot'))).toBe(true)
    expect(isSha256Hex('BA7816BF8F01CFEA414140DE5DAE2223B00361A396177A9CB410FF61F20015AD')).toBe(false)
    expect(isSha256Hex('ba7816bf')).toBe(false)
  })
})
