/** Lower case without accents, so "genset säo" finds "Genset São". */
export function foldText(text: string): string {
  return text.normalize('NFD').replace(/\p{M}/gu, '').toLocaleLowerCase();
}

/** The words of a search, folded; empty for a blank search. */
export function searchTerms(query: string): string[] {
  return foldText(query).split(/\s+/).filter(Boolean);
}

/** Every word of the search occurs in the engine's name or its site's name. */
export function matchesSearch(terms: readonly string[], engineName: string, siteName: string): boolean {
  if (!terms.length) return true;
  const haystack = `${foldText(engineName)}\n${foldText(siteName)}`;
  return terms.every((t) => haystack.includes(t));
}
