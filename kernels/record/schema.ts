// The types of every field of a record, checked before anything reads it: a record whose `seconds`
// is "yesterday" or whose `states` is "63" would be shown and compared as if it meant something.
// Fields this kernel does not know are allowed (a newer kernel may add some) and compared as they are.

/** A field type: a scalar kind, one of some strings, null-or, an array of, an object with fields, or a map. */
export type FieldType =
  | 'string' | 'number' | 'nat' | 'int' | 'bool' | 'sha256' | 'shown'
  | { oneOf: readonly string[] }
  | { orNull: FieldType }
  | { arrayOf: FieldType }
  | { fields: Record<string, FieldType>; optional?: readonly string[] }
  | { mapOf: FieldType }

const nat: FieldType = 'nat'
const str: FieldType = 'string'
const message: FieldType = { fields: { from: nat, to: nat, message: str } }

const tick: FieldType = {
  fields: {
    tick: nat, crashed: { arrayOf: nat }, stabilized: 'bool', stepped: { arrayOf: nat },
    received: { arrayOf: message }, sent: { arrayOf: message },
    changes: { arrayOf: { fields: { process: nat, variable: str, from: 'shown', to: 'shown' } } },
  },
  optional: ['stabilized'],
}

const counterexample: FieldType = {
  fields: {
    kind: str, message: str,
    initial: { arrayOf: { fields: { process: nat, values: { mapOf: 'shown' } } } },
    ticks: { arrayOf: tick }, loopStart: nat,
    atoms: { arrayOf: { fields: { text: str, values: { arrayOf: 'bool' } } } },
  },
  optional: ['loopStart', 'atoms', 'initial'],
}

const cutoff: FieldType = {
  fields: {
    applies: 'bool', processes: { orNull: nat }, statement: str, tex: str, passed: { arrayOf: str },
    reasons: { arrayOf: { fields: { rule: 'int', name: str, line: nat, column: nat, message: str }, optional: ['name'] } },
  },
  optional: ['tex', 'passed'],
}

const row: FieldType = {
  fields: {
    row: nat, check: nat, protocol: str, property: str, processes: nat, constants: { mapOf: 'int' },
    timing: str, verdict: { oneOf: ['holds', 'violated', 'inconclusive', 'error'] }, states: nat, transitions: nat,
    seconds: 'number', complete: 'bool', cutoff, counterexample: { orNull: counterexample }, assignment: { mapOf: nat },
    method: str, reducedStates: nat, productStates: nat, note: str, agreement: 'bool',
  },
  optional: ['method', 'reducedStates', 'productStates', 'note', 'agreement'],
}

/** The type of a whole record (records.md). */
export const RECORD_TYPE: FieldType = {
  fields: {
    format: { fields: { name: { oneOf: ['twofold-record'] }, version: 'int' } },
    kernel: { fields: { name: str, version: str } },
    notebook: { fields: { path: str, sha256: 'sha256', text: str } },
    plan: { fields: { rows: nat, sha256: 'sha256' } },
    options: {
      fields: {
        only: { orNull: str },
        shard: { orNull: { fields: { index: nat, count: nat, indices: { arrayOf: nat } } } },
        limits: { arrayOf: { orNull: nat } },
      },
    },
    blocks: { arrayOf: { fields: { kind: { oneOf: ['protocol', 'property', 'check'] }, name: str, line: nat, sha256: 'sha256' } } },
    errors: { arrayOf: { fields: { line: nat, column: nat, message: str } } },
    checks: { arrayOf: row },
    created: str,
  },
}

function describe(t: FieldType): string {
  if (typeof t === 'string') {
    return { string: 'a string', number: 'a number', nat: 'a whole number >= 0', int: 'an integer', bool: 'true or false',
      sha256: '64 lowercase hex digits', shown: 'a boolean, number or string' }[t]
  }
  if ('oneOf' in t) return `one of ${t.oneOf.map((s) => JSON.stringify(s)).join(', ')}`
  if ('orNull' in t) return `null or ${describe(t.orNull)}`
  if ('arrayOf' in t) return 'an array'
  return 'an object'
}

function typeName(v: unknown): string {
  if (v === null) return 'null'
  if (Array.isArray(v)) return 'an array'
  if (typeof v === 'string') return `the string ${JSON.stringify(v.length > 40 ? v.slice(0, 40) + '...' : v)}`
  if (typeof v === 'object') return 'an object'
  return `${typeof v} ${String(v)}`
}

function matchesScalar(t: string, v: unknown): boolean {
  switch (t) {
    case 'string': return typeof v === 'string'
    case 'number': return typeof v === 'number' && Number.isFinite(v)
    case 'nat': return Number.isSafeInteger(v) && (v as number) >= 0
    case 'int': return Number.isSafeInteger(v)
    case 'bool': return typeof v === 'boolean'
    case 'sha256': return typeof v === 'string' && /^[0-9a-f]{64}$/.test(v)
    default: return typeof v === 'boolean' || typeof v === 'string' || (typeof v === 'number' && Number.isFinite(v))
  }
}

/** The first field of `value` (depth first, in the type's field order) whose type is wrong, as `path: should be ..., not ...`; null when all fit. */
export function typeFault(value: unknown, t: FieldType, path = ''): string | null {
  const at = path || 'the document'
  const wrong = () => `${at} should be ${describe(t)}, not ${typeName(value)}`
  if (typeof t === 'string') return matchesScalar(t, value) ? null : wrong()
  if ('oneOf' in t) return typeof value === 'string' && t.oneOf.includes(value) ? null : wrong()
  if ('orNull' in t) {
    if (value === null) return null
    const fault = typeFault(value, t.orNull, path)
    return fault === null || typeof value === 'object' ? fault : wrong()
  }
  if ('arrayOf' in t) {
    if (!Array.isArray(value)) return wrong()
    for (let i = 0; i < value.length; i++) {
      const fault = typeFault(value[i], t.arrayOf, `${path}[${i}]`)
      if (fault) return fault
    }
    return null
  }
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return wrong()
  const obj = value as Record<string, unknown>
  if ('mapOf' in t) {
    for (const key of Object.keys(obj)) {
      const fault = typeFault(obj[key], t.mapOf, `${path}.${key}`)
      if (fault) return fault
    }
    return null
  }
  for (const [key, ft] of Object.entries(t.fields)) {
    const sub = path ? `${path}.${key}` : key
    if (!Object.prototype.hasOwnProperty.call(obj, key)) {
      if (t.optional?.includes(key)) continue
      return `${sub} is missing`
    }
    const fault = typeFault(obj[key], ft, sub)
    if (fault) return fault
  }
  return null
}
