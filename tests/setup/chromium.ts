// @ts-expect-error plain ESM script without types
import { ensureChromium } from '../../scripts/install-test-tools.mjs'

export function setup() {
  ensureChromium()
}
