import { describe, expect, it } from 'vitest'
import { replanChunks } from '../../shared/utils/replan-chunks'

describe('replanChunks: a range in consecutive weeks', () => {
  it('two whole weeks are two pieces, end to end, none overlapping', () => {
    expect(replanChunks('2031-06-02', '2031-06-15')).toEqual([
      { from: '2031-06-02', to: '2031-06-08' },
      { from: '2031-06-09', to: '2031-06-15' },
    ])
  })
  it('a range that is not whole weeks ends with a shorter piece; across a month end and a leap day', () => {
    expect(replanChunks('2028-02-24', '2028-03-04')).toEqual([
      { from: '2028-02-24', to: '2028-03-01' },
      { from: '2028-03-02', to: '2028-03-04' },
    ])
  })
  it('one day is one piece; a reversed or empty range has none', () => {
    expect(replanChunks('2031-06-02', '2031-06-02')).toEqual([{ from: '2031-06-02', to: '2031-06-02' }])
    expect(replanChunks('2031-06-09', '2031-06-02')).toEqual([])
    expect(replanChunks('', '2031-06-02')).toEqual([])
  })
  it('a 26-week season is 26 pieces covering every day once', () => {
    const pieces = replanChunks('2031-03-02', '2031-08-29')
    expect(pieces).toHaveLength(26)
    expect(pieces[0]!.from).toBe('2031-03-02')
    expect(pieces.at(-1)!.to).toBe('2031-08-29')
  })
})
