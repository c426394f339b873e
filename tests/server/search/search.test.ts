import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { makeChip, uid } from '../inventory-helpers'

let t: Awaited<ReturnType<typeof startTestApp>>
let optics: TestAgent, fab: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  optics = await signedInAs(t.app, 'optics_staff')
})
afterAll(async () => {
  await t.stop()
})

type Hit = { kind: string; id: number; label: string; to: string }
const search = async (q: string) => (await optics.get(`/api/search?q=${encodeURIComponent(q)}`)).body.hits as Hit[]

describe('global search', () => {
  it('finds an exact code first, then code prefixes', async () => {
    const { wafer, chip } = await makeChip(fab)
    const hits = await search(wafer.code)
    expect(hits[0]).toMatchObject({ kind: 'wafer', id: wafer.id, to: `/wafers/${wafer.id}` })
    expect(hits.some((h) => h.kind === 'chip' && h.id === chip.id)).toBe(false)
    const chipHits = await search(chip.code.toLowerCase())
    expect(chipHits[0]).toMatchObject({ kind: 'chip', id: chip.id, to: `/chips/${chip.id}` })
  })

  it('finds wafers by lot, supplier and notes; materials by name; people still', async () => {
    const tag = uid()
    const { wafer, material } = await makeChip(
      fab,
      {},
      { lot: `LOT-${tag}`, supplier: `Brakvik Optics ${tag}`, notes: `polished twice ${tag}` },
    )
    expect((await search(`LOT-${tag}`)).map((h) => h.id)).toContain(wafer.id)
    expect((await search(`Brakvik Optics ${tag}`))[0].id).toBe(wafer.id)
    expect((await search(`twice ${tag}`))[0].id).toBe(wafer.id)
    expect((await search(material.name)).find((h) => h.kind === 'material')).toMatchObject({
      id: material.id,
      to: `/materials/${material.id}`,
    })
    expect((await search('Lindqvist')).some((h) => h.kind === 'person')).toBe(true)
  })
})
