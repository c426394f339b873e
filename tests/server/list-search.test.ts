import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from './helpers'
import { disk, makeChip, uid } from './inventory-helpers'
import { makeLaserSetup, sessionBody } from './fixtures-measurements'
import { codePrefixes, fulltextQuery } from '../../server/services/text-search'

/**
 * The search boxes of the big lists use index lookups (code prefixes, FULLTEXT words in notes):
 * these tests pin down what a person can type and still find the record.
 */
let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent, optics: TestAgent
beforeAll(async () => { t = await startTestApp(); fab = await signedInAs(t.app, 'fab_technician'); optics = await signedInAs(t.app, 'optics_staff') })
afterAll(async () => { await t.stop() })

const codes = (body: { rows: { code: string }[] }) => body.rows.map((r) => r.code).sort()

describe('code prefixes', () => {
  it('leave the kind letter optional and map nested codes in lists only', () => {
    expect(codePrefixes('0012-03', 'A')).toEqual(['A-0012-03'])
    expect(codePrefixes(' c-0012-03 ', 'A')).toEqual(['A-0012-03', 'C-0012-03'])
    expect(codePrefixes('A-0012', 'A')).toEqual(['A-0012'])
    expect(codePrefixes('C-0012', 'A', false)).toEqual(['C-0012'])
    expect(codePrefixes('  ', 'A')).toEqual([])
  })

  it('turn typed words into a boolean FULLTEXT query without operators, short words or stop words', async () => {
    expect(await fulltextQuery(t.db, 'dose te')).toBe('+dose*')
    expect(await fulltextQuery(t.db, 'resist +peel* (edge)')).toBe('+resist* +peel* +edge*')
    // "the" is in MariaDB's default stop-word list; "%_%" has no word at all
    expect(await fulltextQuery(t.db, 'the')).toBeNull()
    expect(await fulltextQuery(t.db, '%_%')).toBeNull()
  })
})

describe('list search boxes', () => {
  it('arrays: by own code, by chip code with or without its letter, and by a word of the notes', async () => {
    const { chip } = await makeChip(fab)
    const tag = uid()
    await fab.post('/api/arrays').send({ ...disk(chip.id, 'A1'), notes: `dose ladder ${tag} first row` })
    await fab.post('/api/arrays').send(disk(chip.id, 'B2'))
    const both = [`A-${chip.code.slice(2)}-A1`, `A-${chip.code.slice(2)}-B2`]
    expect(codes((await fab.get(`/api/arrays?q=${chip.code}`)).body)).toEqual(both)
    expect(codes((await fab.get(`/api/arrays?q=${chip.code.slice(2)}`)).body)).toEqual(both)
    expect(codes((await fab.get(`/api/arrays?q=${both[1].toLowerCase()}`)).body)).toEqual([both[1]])
    const byWord = (await fab.get(`/api/arrays?q=${encodeURIComponent(`ladder ${tag}`)}`)).body
    expect(codes(byWord)).toEqual([both[0]])
    expect(byWord.total).toBe(1)
  })

  it('chips: by wafer code, by a word of the notes, by the wafer lot', async () => {
    const tag = uid()
    const { wafer, chip } = await makeChip(fab, {}, { lot: `LOT-${tag}` })
    await fab.patch(`/api/chips/${chip.id}`).send({ notes: `cracked corner ${tag}` })
    expect(codes((await fab.get(`/api/chips?q=${wafer.code}`)).body)).toEqual([chip.code])
    expect(codes((await fab.get(`/api/chips?q=${encodeURIComponent(`cracked ${tag}`)}`)).body)).toEqual([chip.code])
    expect(codes((await fab.get(`/api/chips?q=${tag}`)).body)).toEqual([chip.code])
  })

  it('sessions: by an array code prefix, by a word of the notes or the detector', async () => {
    const { chip } = await makeChip(fab)
    const a = (await fab.post('/api/arrays').send(disk(chip.id, 'C3'))).body
    const setup = await makeLaserSetup(t.db)
    const tag = uid()
    const made = await optics.post('/api/sessions').send(sessionBody(setup.id, [a.id], { notes: `alignment drifted ${tag}`, detector: `Cooled CCD ${tag}x` }))
    expect(made.status).toBe(201)
    const find = async (q: string) => codes((await optics.get(`/api/sessions?q=${encodeURIComponent(q)}`)).body)
    expect(await find(a.code)).toEqual([made.body.code])
    expect(await find(chip.code)).toEqual([made.body.code])
    expect(await find(`drifted ${tag}`)).toEqual([made.body.code])
    expect(await find(`${tag}x`)).toEqual([made.body.code])
    expect(await find(made.body.code)).toEqual([made.body.code])
  })
})
