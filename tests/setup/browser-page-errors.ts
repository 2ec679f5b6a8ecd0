// Every browser test fails when a page it opened logged a console error or threw an uncaught
// error (a hydration mismatch, a crashed handler), unless the test allowed it by name.
import { afterEach, expect } from 'vitest'
import { takePageErrors } from '../helpers/browser'

afterEach(() => {
  const errors = takePageErrors()
  expect(errors, 'console or page errors in the browser').toEqual([])
})
