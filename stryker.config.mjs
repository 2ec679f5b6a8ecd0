// Mutation testing of the water engine and the advice modules on the unit tests: `npm run mutation`
// (not part of `npm test`; a full run takes several minutes on 2 cores). While working, mutate one
// file: `npx stryker run --mutate shared/utils/advice.ts`. Notes (STACK.md): `nuxt prepare` first,
// because the tsconfig extends .nuxt/; `inPlace`, because the sandbox would not carry .nuxt/; a
// vitest config with the unit tests only. No file listed here may be read as text by a test.
/** @type {import('@stryker-mutator/api/core').PartialStrykerOptions} */
export default {
  testRunner: 'vitest',
  vitest: { configFile: 'vitest.unit.config.ts' },
  inPlace: true,
  mutate: [
    'shared/utils/water/*.ts',
    'shared/utils/advice.ts',
    'shared/utils/home-dosing.ts',
  ],
  coverageAnalysis: 'perTest',
  concurrency: 2,
  timeoutMS: 20_000,
  reporters: ['clear-text', 'progress', 'html', 'json'],
  htmlReporter: { fileName: 'tests/artifacts/mutation/index.html' },
  jsonReporter: { fileName: 'tests/artifacts/mutation/report.json' },
  tempDirName: 'tests/artifacts/.stryker-tmp',
  cleanTempDir: 'always',
}
