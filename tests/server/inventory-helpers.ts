import type TestAgent from 'supertest/lib/agent'

/** Fixtures for the inventory API tests: every call makes new, uniquely named records. */
export const uid = () => `${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`

export async function makeMaterial(fab: TestAgent, over: object = {}) {
  const res = await fab.post('/api/materials').send({
    name: `Test GaAs ${uid()}`,
    formula: 'GaAs',
    pointGroup: '-43m',
    bandGapEv: 1.424,
    coefficients: [
      {
        component: 'd14',
        order: 2,
        valuePmV: 119,
        wavelengthNm: 1550,
        source: 'typical value, verify',
        isTypical: true,
      },
    ],
    ...over,
  })
  if (res.status !== 201) throw new Error(`material: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body
}

export async function makeBox(fab: TestAgent) {
  const room = (await fab.post('/api/locations').send({ kind: 'room', name: `Room ${uid()}` })).body
  const cab = (await fab.post('/api/locations').send({ kind: 'cabinet', name: 'Cabinet 1', parentId: room.id })).body
  const box = (await fab.post('/api/locations').send({ kind: 'box', name: 'Box 1', parentId: cab.id })).body
  if (!box.id) throw new Error(`box: ${JSON.stringify(box)}`)
  return { room, cab, box }
}

export async function makeWafer(fab: TestAgent, over: object = {}, materialOver: object = {}) {
  const material = await makeMaterial(fab, materialOver)
  const res = await fab.post('/api/wafers').send({
    materialId: material.id,
    cutNormal: [0, 0, 1],
    flatDirection: [1, -1, 0],
    diameterMm: 50.8,
    thicknessUm: 350,
    lot: `LOT-${uid()}`,
    supplier: 'Norrvik Semiconductor Supply',
    ...over,
  })
  if (res.status !== 201) throw new Error(`wafer: ${res.status} ${JSON.stringify(res.body)}`)
  return { material, wafer: res.body }
}

export async function makeChip(fab: TestAgent, over: object = {}, waferOver: object = {}, materialOver: object = {}) {
  const { material, wafer } = await makeWafer(fab, waferOver, materialOver)
  const res = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 1, widthMm: 5, heightMm: 5, ...over })
  if (res.status !== 201) throw new Error(`dice: ${res.status} ${JSON.stringify(res.body)}`)
  return { material, wafer, chip: res.body.chips[0] }
}

export const disk = (chipId: number, position = 'A1') => ({
  chipId,
  position,
  shape: 'disk',
  dimensionsNm: { diameterNm: 450 },
  lattice: 'square',
  periodXNm: 900,
  periodYNm: 900,
})
