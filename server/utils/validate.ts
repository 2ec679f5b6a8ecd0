import type { H3Event } from 'h3'
import type { z } from 'zod'
import { fieldErrors } from '../../shared/utils/field-errors'
import { PARAMETER_CATALOGUE, type ReadingKey } from '../../shared/utils/water/parameters'
import { readLimitedBody } from './body-limit'
import { httpError } from './errors'

/**
 * A field path in the words of the form: a water value by its label ("Water temperature", of the
 * second test "Water temperature (test 2)"); any other path as it is.
 */
export function fieldTitle(path: string): string {
  const parts = path.split('.')
  const info = PARAMETER_CATALOGUE[parts.at(-1) as ReadingKey]
  if (!info) return path
  const index = parts.length >= 3 && /^\d+$/.test(parts.at(-2)!) ? Number(parts.at(-2)) : null
  return index === null ? info.label : `${info.label} (test ${index + 1})`
}

function check<S extends z.ZodType>(schema: S, value: unknown, where: string): z.output<S> {
  const parsed = schema.safeParse(value)
  if (!parsed.success) {
    const fields = fieldErrors(parsed.error)
    const [first] = Object.entries(fields)
    throw httpError(400, `Invalid ${where}: ${first ? `${fieldTitle(first[0])} — ${first[1]}` : 'unreadable'}`, { fields })
  }
  return parsed.data
}

/**
 * The request body parsed by `schema`; a 400 naming each bad field otherwise. The bytes are
 * counted while they arrive: past the JSON limit is a 413, however the body was sent.
 */
export async function readBodyAs<S extends z.ZodType>(event: H3Event, schema: S): Promise<z.output<S>> {
  const raw = await readLimitedBody(event)
  let body: unknown
  if (raw?.length) {
    try {
      body = await readBody(event)
    }
    catch {
      throw httpError(400, 'Invalid body: it is not valid JSON')
    }
  }
  return check(schema, body ?? {}, 'body')
}

export function queryAs<S extends z.ZodType>(event: H3Event, schema: S): z.output<S> {
  return check(schema, getQuery(event), 'query')
}

export function paramsAs<S extends z.ZodType>(event: H3Event, schema: S): z.output<S> {
  return check(schema, getRouterParams(event, { decode: true }), 'path')
}
