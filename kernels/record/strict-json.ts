// A strict JSON reader for records. `JSON.parse` keeps the last of two equal keys, so a record with
// `"verdict": "holds", "verdict": "violated"` reads as violated to one tool and holds to another;
// this reader refuses any duplicate key instead, and says where every fault is (line and column).

/** Text that is not JSON, or JSON with a duplicate key; `message` names the place. */
export class StrictJsonError extends Error {
  override name = 'StrictJsonError'
}

/** Nesting deeper than this is refused rather than risking the stack (records nest about 8 deep). */
const MAX_DEPTH = 256

/** Line and column (1-based) of offset `at` in `text`. */
export function lineColumn(text: string, at: number): { line: number; column: number } {
  let line = 1
  let start = 0
  for (let i = text.indexOf('\n'); i !== -1 && i < at; i = text.indexOf('\n', i + 1)) {
    line++
    start = i + 1
  }
  return { line, column: at - start + 1 }
}

const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y
const STRING_BODY = /(?:[^"\\\u0000-\u001f]|\\(?:["\\/bfnrt]|u[0-9a-fA-F]{4}))*"/y

/** Parses `text` as JSON, refusing duplicate keys. Objects get their keys as own properties (even `__proto__`). */
export function parseStrictJson(text: string): unknown {
  let pos = 0
  const fail = (what: string, at = pos): never => {
    const { line, column } = lineColumn(text, at)
    throw new StrictJsonError(`${what} at line ${line}, column ${column}`)
  }
  const space = () => {
    while (pos < text.length) {
      const c = text.charCodeAt(pos)
      if (c === 0x20 || c === 0x0a || c === 0x0d || c === 0x09) pos++
      else break
    }
  }
  const string = (): string => {
    const start = pos
    STRING_BODY.lastIndex = pos + 1
    if (!STRING_BODY.exec(text)) fail(pos + 1 >= text.length ? 'the text ends inside a string' : 'a malformed string', start)
    pos = STRING_BODY.lastIndex
    return JSON.parse(text.slice(start, pos)) as string
  }
  const value = (depth: number): unknown => {
    if (depth > MAX_DEPTH) fail(`nesting deeper than ${MAX_DEPTH}`)
    space()
    if (pos >= text.length) fail('the text ends where a value should be')
    const c = text[pos]
    if (c === '"') return string()
    if (c === '{') {
      pos++
      const obj: Record<string, unknown> = {}
      const seen = new Set<string>()
      space()
      if (text[pos] === '}') { pos++; return obj }
      for (;;) {
        space()
        if (text[pos] !== '"') fail(pos >= text.length ? 'the text ends inside an object' : 'expected a key in quotes')
        const at = pos
        const key = string()
        if (seen.has(key)) fail(`duplicate key ${JSON.stringify(key)}`, at)
        seen.add(key)
        space()
        if (text[pos] !== ':') fail(`expected ':' after key ${JSON.stringify(key)}`)
        pos++
        Object.defineProperty(obj, key, { value: value(depth + 1), enumerable: true, writable: true, configurable: true })
        space()
        if (text[pos] === ',') { pos++; continue }
        if (text[pos] === '}') { pos++; return obj }
        fail(pos >= text.length ? 'the text ends inside an object' : "expected ',' or '}'")
      }
    }
    if (c === '[') {
      pos++
      const arr: unknown[] = []
      space()
      if (text[pos] === ']') { pos++; return arr }
      for (;;) {
        arr.push(value(depth + 1))
        space()
        if (text[pos] === ',') { pos++; continue }
        if (text[pos] === ']') { pos++; return arr }
        fail(pos >= text.length ? 'the text ends inside an array' : "expected ',' or ']'")
      }
    }
    for (const [word, v] of [['true', true], ['false', false], ['null', null]] as const) {
      if (text.startsWith(word, pos)) { pos += word.length; return v }
    }
    NUMBER.lastIndex = pos
    const m = NUMBER.exec(text)
    if (!m) fail(`unexpected ${JSON.stringify(c)}`)
    const n = Number(m![0])
    if (!Number.isFinite(n)) fail('a number too large for a record')
    pos = NUMBER.lastIndex
    return n
  }
  const result = value(0)
  space()
  if (pos < text.length) fail('text after the end of the document')
  return result
}
