import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { canonicalJson, canonicalJsonPretty } from '../../kernels/base/canonical'

/** The same value with every object's keys in reverse insertion order. */
function reversedKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(reversedKeys)
  if (value && typeof value === 'object')
    return Object.fromEntries(Object.entries(value).reverse().map(([k, v]) => [k, reversedKeys(v)]))
  return value
}

const jsonValue = fc.jsonValue({ maxDepth: 4 }).map((v) => JSON.parse(JSON.stringify(v)))

describe('canonicalJson', () => {
  it('sorts keys and writes no whitespace', () => {
    expect(canonicalJson({ pier: 2, anchor: [1, { z: true, a: null }], name: 'north quay' })).toBe(
      '{"anchor":[1,{"a":null,"z":true}],"name":"north quay","pier":2}',
    )
  })

  it('gives the same text whatever order the keys were built in', () => {
    fc.assert(fc.property(jsonValue, (v) => canonicalJson(v) === canonicalJson(reversedKeys(v))))
  })

  it('reads back as the value it was written from', () => {
    // Oracle: the platform's JSON.parse and a structural comparison.
    fc.assert(fc.property(jsonValue, (v) => {
      expect(JSON.parse(canonicalJson(v))).toEqual(v)
    }))
  })

  it('leaves out undefined members, as JSON does', () => {
    expect(canonicalJson({ a: 1, b: undefined })).toBe('{"a":1}')
  })

  it('refuses values JSON cannot carry instead of writing null', () => {
    expect(() => canonicalJson({ states: NaN })).toThrow(/NaN at \$\.states/)
    expect(() => canonicalJson([1, Infinity])).toThrow(/Infinity/)
    expect(() => canonicalJson([undefined])).toThrow(/undefined at \$\[0\]/)
    expect(() => canonicalJson({ f: () => 1 })).toThrow(/function/)
  })
})

describe('canonicalJsonPretty', () => {
  it('lays the canonical order out with two-space indentation', () => {
    expect(canonicalJsonPretty({ b: [1, 2], a: {} })).toBe('{\n  "a": {},\n  "b": [\n    1,\n    2\n  ]\n}')
  })

  it('holds the same value as the compact form', () => {
    fc.assert(fc.property(jsonValue, (v) => canonicalJson(JSON.parse(canonicalJsonPretty(v))) === canonicalJson(v)))
  })
})
