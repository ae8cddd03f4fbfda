// Canonical JSON: one text per value, whatever order its keys were built in. Records are compared
// and merged through it, so two runs that found the same things write the same bytes.
//
// The rules: object keys sorted by UTF-16 code units (what `Array.prototype.sort` does), no
// whitespace, strings and numbers written as `JSON.stringify` writes them, `undefined` members left
// out (as JSON does). Values JSON cannot carry faithfully (NaN, Infinity, functions, bigints,
// undefined in an array) are refused rather than silently turned into `null`.

/** A JSON value as records hold it. */
export type Json = null | boolean | number | string | Json[] | { [key: string]: Json }

/** The canonical JSON text of `value` (sorted keys, no whitespace). Throws on values JSON cannot carry. */
export function canonicalJson(value: unknown): string {
  return write(value, '$', null, '')
}

/**
 * The same canonical order, laid out with two-space indentation for people to read. Still
 * deterministic: equal values give equal text, so record files can be compared byte for byte.
 */
export function canonicalJsonPretty(value: unknown): string {
  return write(value, '$', '  ', '')
}

function write(value: unknown, path: string, indent: string | null, depth: string): string {
  if (value === null) return 'null'
  switch (typeof value) {
    case 'boolean':
      return value ? 'true' : 'false'
    case 'number':
      if (!Number.isFinite(value)) throw new TypeError(`canonical JSON cannot hold ${value} at ${path}`)
      return JSON.stringify(value)
    case 'string':
      return JSON.stringify(value)
    case 'object':
      break
    default:
      throw new TypeError(`canonical JSON cannot hold a ${typeof value} at ${path}`)
  }
  const inner = indent === null ? '' : depth + indent
  const open = indent === null ? '' : '\n' + inner
  const close = indent === null ? '' : '\n' + depth
  const sep = indent === null ? ',' : ',\n' + inner
  const colon = indent === null ? ':' : ': '
  if (Array.isArray(value)) {
    if (value.length === 0) return '[]'
    const parts = value.map((item, i) => {
      if (item === undefined) throw new TypeError(`canonical JSON cannot hold undefined at ${path}[${i}]`)
      return write(item, `${path}[${i}]`, indent, inner)
    })
    return '[' + open + parts.join(sep) + close + ']'
  }
  const record = value as Record<string, unknown>
  const keys = Object.keys(record).filter((key) => record[key] !== undefined).sort()
  if (keys.length === 0) return '{}'
  const parts = keys.map((key) => JSON.stringify(key) + colon + write(record[key], `${path}.${key}`, indent, inner))
  return '{' + open + parts.join(sep) + close + '}'
}
