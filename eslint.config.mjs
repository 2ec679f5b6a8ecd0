// Lint rules: @nuxt/eslint's project-aware flat config (Vue, TypeScript, imports).
import withNuxt from './.nuxt/eslint.config.mjs'

export default withNuxt(
  { ignores: ['.data/**', '.output/**', 'tests/artifacts/**', 'bench/results/**', 'drizzle/**'] },
  // An empty catch says "this failure is expected and harmless" (a probe, a best-effort cleanup).
  { rules: { 'no-empty': ['error', { allowEmptyCatch: true }] } },
  // Tests and scripts read JSON bodies of many shapes; `any` there is the honest type.
  { files: ['tests/**', 'scripts/**', 'bench/**'], rules: { '@typescript-eslint/no-explicit-any': 'off' } },
)
