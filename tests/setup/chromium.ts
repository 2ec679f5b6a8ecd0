// @ts-expect-error plain ESM script without types
import { ensureChromium } from '../../scripts/install-browser.mjs'

export function setup() {
  ensureChromium()
}
