/** A pattern for ILIKE that matches `text` anywhere, with % and _ taken literally. */
export function containsPattern(text: string) {
  return `%${text.replace(/[%_\\]/g, m => `\\${m}`)}%`
}
