// A failed record write leaves the previous record whole (issue 10, item 9): the record is written
// to a temporary file beside it, flushed and renamed, so a real file-size limit (`ulimit -f`, which
// makes the write fail with EFBIG) stops the new record without touching the old one.
import { spawnSync } from 'node:child_process'
import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, describe, expect, it } from 'vitest'
import { twofold, workspace } from './harness'

const bin = fileURLToPath(new URL('../../bin/twofold.js', import.meta.url))

const ferry = [
  '# Ferry lights',
  '',
  '```protocol',
  'protocol ferry {',
  '  timing asynchronous',
  '  message horn',
  '  state moored: bool = true',
  '  step { broadcast horn }',
  '}',
  '```',
  '',
  '```property',
  'property docked = forall p: always p.moored',
  '```',
  '',
  '```check',
  'check ferry: docked',
  '```',
  '',
].join('\n')

const ws = workspace({ 'ferry.md': ferry })
afterAll(() => ws.remove())

describe('record writes', () => {
  it('keeps the old record when the new one cannot be written in full (file-size limit)', async () => {
    expect((await twofold(['check', 'ferry.md', '--record', 'r.json'], ws.dir)).code).toBe(0)
    const good = readFileSync(join(ws.dir, 'r.json'), 'utf8')
    // A long notebook: its record (which embeds it) is larger than the 16 KiB limit below.
    ws.write('ferry.md', ferry + 'The ferry crosses the sound at dawn. '.repeat(1000) + '\n')
    const ran = spawnSync('bash', ['-c', `ulimit -f 16; exec "${process.execPath}" "${bin}" check ferry.md --record r.json`], { cwd: ws.dir, encoding: 'utf8' })
    expect(ran.status).toBe(2)
    expect(ran.stderr).toMatch(/^twofold: cannot write record r\.json: .*\n$/)
    // Oracle: the bytes read before the failed run.
    expect(readFileSync(join(ws.dir, 'r.json'), 'utf8')).toBe(good)
    expect(readdirSync(ws.dir).filter((f) => f.endsWith('.tmp'))).toEqual([])
    // Without the limit the same command writes the new record.
    expect((await twofold(['check', 'ferry.md', '--record', 'r.json'], ws.dir)).code).toBe(0)
    expect(readFileSync(join(ws.dir, 'r.json'), 'utf8')).not.toBe(good)
  })
})
