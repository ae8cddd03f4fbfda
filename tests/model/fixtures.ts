// Notebook text to a protocol, for the model and explore tests.
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { ProtocolModel } from '../../kernels/language/model'
import { compileInstance, type Instance } from '../../kernels/model/instance'

/** The first protocol of a notebook holding `body` in a protocol block; fails on any diagnostic. */
export function protocolOf(body: string): ProtocolModel {
  const nb = analyzeNotebook('# fixture\n\n```protocol\n' + body + '\n```\n')
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  if (errors.length > 0) throw new Error(errors.map((d) => `${d.line}:${d.column} ${d.message}`).join('\n'))
  return nb.protocols[0]
}

/** G_n of the protocol in `body`, with its declared constants unless `constants` are given. */
export function instanceOf(body: string, n: number, constants?: number[]): Instance {
  const p = protocolOf(body)
  return compileInstance(p, n, constants ?? p.consts.map((c) => c.value))
}

/** Two processes broadcasting one kind and remembering that they heard it. */
export const heardPair = (timing: string, faults: string) => `protocol beacons {
  timing ${timing}
  faults ${faults}
  message beat
  state heard: bool = false
  on beat from q { heard := true }
  step { broadcast beat }
}`
