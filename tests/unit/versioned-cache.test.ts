import { afterEach, describe, expect, it } from 'vitest'
import { versionedCache } from '../../server/utils/versioned-cache'

/** A computation that counts its runs and finishes when told. */
function deferred<T>() {
  let resolve!: (v: T) => void
  let reject!: (e: unknown) => void
  const promise = new Promise<T>((res, rej) => {
    resolve = res
    reject = rej
  })
  return { promise, resolve, reject }
}

afterEach(() => {
  delete process.env.RILLBOOK_ANSWER_CACHE
})

describe('versionedCache', () => {
  it('answers the kept value while the version is the same, and computes again when it changes', async () => {
    const cache = versionedCache<number>(10)
    let runs = 0
    const compute = (v: number) => async () => {
      runs++
      return v
    }
    expect(await cache.get('k', '1', compute(10))).toBe(10)
    expect(await cache.get('k', '1', compute(99))).toBe(10)
    expect(runs).toBe(1)
    expect(await cache.get('k', '2', compute(20))).toBe(20)
    expect(runs).toBe(2)
    // Another key is another answer.
    expect(await cache.get('other', '2', compute(30))).toBe(30)
    expect(runs).toBe(3)
  })

  it('shares one computation between concurrent requests for the same key and version', async () => {
    const cache = versionedCache<string>(10)
    const d = deferred<string>()
    let runs = 0
    const compute = () => {
      runs++
      return d.promise
    }
    const all = [cache.get('k', '7', compute), cache.get('k', '7', compute), cache.get('k', '7', compute)]
    d.resolve('built once')
    expect(await Promise.all(all)).toEqual(['built once', 'built once', 'built once'])
    expect(runs).toBe(1)
  })

  it('does not keep a computation that failed', async () => {
    const cache = versionedCache<string>(10)
    await expect(cache.get('k', '1', async () => {
      throw new Error('database down')
    })).rejects.toThrow('database down')
    expect(cache.size).toBe(0)
    expect(await cache.get('k', '1', async () => 'fine')).toBe('fine')
  })

  it('keeps at most `max` entries, dropping the least recently used', async () => {
    const cache = versionedCache<string>(2)
    let runs = 0
    const compute = (v: string) => async () => {
      runs++
      return v
    }
    await cache.get('a', '1', compute('a'))
    await cache.get('b', '1', compute('b'))
    await cache.get('a', '1', compute('a')) // a is now the most recent
    await cache.get('c', '1', compute('c')) // b goes
    expect(cache.size).toBe(2)
    expect(runs).toBe(3)
    await cache.get('a', '1', compute('a'))
    expect(runs).toBe(3)
    await cache.get('b', '1', compute('b'))
    expect(runs).toBe(4)
  })

  it('computes every time when RILLBOOK_ANSWER_CACHE=0', async () => {
    process.env.RILLBOOK_ANSWER_CACHE = '0'
    const cache = versionedCache<number>(10)
    let runs = 0
    const compute = async () => ++runs
    await cache.get('k', '1', compute)
    expect(await cache.get('k', '1', compute)).toBe(2)
  })
})

describe('versionedCache with a weight', () => {
  it('keeps at most `maxWeight` in all, and does not keep an answer heavier than that alone', async () => {
    const cache = versionedCache<number[]>(100, { weigh: v => v.length, maxWeight: 5 })
    let runs = 0
    const compute = (n: number) => async () => {
      runs++
      return Array.from({ length: n }, (_, i) => i)
    }
    await cache.get('a', '1', compute(3))
    await cache.get('b', '1', compute(2))
    expect(cache.size).toBe(2)
    await cache.get('c', '1', compute(2)) // 7 > 5: a goes
    expect(cache.size).toBe(2)
    await cache.get('b', '1', compute(2))
    expect(runs).toBe(3)
    await cache.get('a', '1', compute(3))
    expect(runs).toBe(4)
    expect((await cache.get('huge', '1', compute(9))).length).toBe(9)
    expect(cache.size).toBe(0)
  })
})
