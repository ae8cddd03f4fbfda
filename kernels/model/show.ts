// Values as people see them: booleans, integers and enum labels, and messages as `kind(v1, v2)`.
import type { Type } from '../language/model'
import type { ShownValue } from '../result'
import type { Layout } from './layout'

/** The shown form of an integer value of a type. */
export function showValue(t: Type, v: number): ShownValue {
  if (t.k === 'bool') return v !== 0
  if (t.k === 'enum') return t.labels[v] ?? v
  return v
}

/** A message value (layout numbering) as `kind` or `kind(v1, v2)`, field values shown. */
export function showMessage(layout: Layout, value: number): string {
  const kind = layout.valueKind[value]
  const m = layout.messages[kind]
  if (m.fieldNames.length === 0) return m.name
  const parts: string[] = []
  for (let f = 0; f < m.fieldNames.length; f++) parts.push(String(showValue(m.fieldTypes[f], layout.valueFields[value * layout.maxFields + f])))
  return `${m.name}(${parts.join(', ')})`
}

/** A message value in the canonical state form of DEVELOPERS.md: `kind` or `kind(v1,v2)`, integers. */
export function canonicalMessage(layout: Layout, value: number): string {
  const kind = layout.valueKind[value]
  const m = layout.messages[kind]
  if (m.fieldNames.length === 0) return m.name
  const parts: number[] = []
  for (let f = 0; f < m.fieldNames.length; f++) parts.push(layout.valueFields[value * layout.maxFields + f])
  return `${m.name}(${parts.join(',')})`
}
